"""Designs beyond one tree: failure analysis, backup links, capacitated and shallow trees.

=================  ==============================================================================
``failures``       ``link_failures``: every forest link's cheapest replacement, or a bridge
``shallow``        ``light_shallow_tree``: routes within alpha x shortest, weight near the MST
``capacitated``   ``capacitated_tree``: Esau-Williams, a capacity per subtree from the root
``redundancy``     ``backup_links``: cheapest links that survive any single link failure
``checks``         argument checks shared by these functions
``pairs``          the one link per node pair they consider (parallel links: the tie rule's first)
=================  ==============================================================================

Outputs are planning aids: resilience requirements (diverse routing, shared ducts and
common-mode failures that a graph does not see), capacities and limits come from local codes and
licensed engineers.
"""
from fastmst.design.failures import LinkFailures, link_failures
from fastmst.design.shallow import ShallowTree, light_shallow_tree
from fastmst.design.capacitated import CapacitatedTree, capacitated_tree
from fastmst.design.redundancy import BackupLinks, backup_links

__all__ = ["LinkFailures", "link_failures", "ShallowTree", "light_shallow_tree",
           "CapacitatedTree", "capacitated_tree", "BackupLinks", "backup_links"]
