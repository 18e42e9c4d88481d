"""One module per file format; each registers itself with :mod:`fastmst.io.registry`.

Every module in this folder is imported when :mod:`fastmst.io` is, so adding a format means
adding one file here: describe it with a ``registry.Format`` and call ``registry.register``.
pyarrow and other optional dependencies are imported inside the functions, not here.
"""
import importlib
import pkgutil

for _module in sorted(m.name for m in pkgutil.iter_modules(__path__)):
    importlib.import_module(f"{__name__}.{_module}")
