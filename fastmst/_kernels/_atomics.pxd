# Atomic, scheduling, prefetch and OpenMP helpers shared by the kernels (cimport them).
#
# Relaxed and acquire/release atomics through the GCC and clang builtins; without them the
# fallbacks are plain loads and stores, correct only single-threaded (the build without
# OpenMP).
from libc.stdint cimport int64_t, uint8_t

cdef extern from *:
    """
    #include <stdint.h>
    #if defined(__unix__) || defined(__APPLE__)
    #include <sched.h>
    #define FASTMST_YIELD() ((void)sched_yield())
    #else
    #define FASTMST_YIELD() ((void)0)
    #endif
    #if defined(__GNUC__) || defined(__clang__)
    static inline int fastmst_cas64(int64_t* p, int64_t expected, int64_t desired) {
        return __atomic_compare_exchange_n(p, &expected, desired, 0, __ATOMIC_RELAXED,
                                           __ATOMIC_RELAXED);
    }
    static inline int64_t fastmst_load64(const int64_t* p) {
        return __atomic_load_n(p, __ATOMIC_RELAXED);
    }
    static inline int fastmst_claim8(uint8_t* p, uint8_t expected, uint8_t desired) {
        return __atomic_compare_exchange_n(p, &expected, desired, 0, __ATOMIC_ACQ_REL,
                                           __ATOMIC_ACQUIRE);
    }
    static inline uint8_t fastmst_get8(const uint8_t* p) {
        return __atomic_load_n(p, __ATOMIC_ACQUIRE);
    }
    static inline void fastmst_put8(uint8_t* p, uint8_t v) {
        __atomic_store_n(p, v, __ATOMIC_RELEASE);
    }
    static inline Py_ssize_t fastmst_getz(const Py_ssize_t* p) {
        return __atomic_load_n(p, __ATOMIC_RELAXED);
    }
    static inline void fastmst_putz(Py_ssize_t* p, Py_ssize_t v) {
        __atomic_store_n(p, v, __ATOMIC_RELAXED);
    }
    #define FASTMST_LOAD_RELAXED(p, out) __atomic_load((p), (out), __ATOMIC_RELAXED)
    #define FASTMST_STORE_RELAXED(p, v) __atomic_store((p), (v), __ATOMIC_RELAXED)
    #define FASTMST_PREFETCH(p) __builtin_prefetch((const void*)(p))
    #define FASTMST_PREFETCH_W(p) __builtin_prefetch((const void*)(p), 1)
    #else
    /* No atomics known: only correct single-threaded (the build without OpenMP). */
    static inline int fastmst_cas64(int64_t* p, int64_t expected, int64_t desired) {
        if (*p != expected) return 0; *p = desired; return 1;
    }
    static inline int64_t fastmst_load64(const int64_t* p) { return *p; }
    static inline int fastmst_claim8(uint8_t* p, uint8_t expected, uint8_t desired) {
        if (*p != expected) return 0; *p = desired; return 1;
    }
    static inline uint8_t fastmst_get8(const uint8_t* p) { return *p; }
    static inline void fastmst_put8(uint8_t* p, uint8_t v) { *p = v; }
    static inline Py_ssize_t fastmst_getz(const Py_ssize_t* p) { return *p; }
    static inline void fastmst_putz(Py_ssize_t* p, Py_ssize_t v) { *p = v; }
    #define FASTMST_LOAD_RELAXED(p, out) (*(out) = *(p))
    #define FASTMST_STORE_RELAXED(p, v) (*(p) = *(v))
    #define FASTMST_PREFETCH(p) ((void)0)
    #define FASTMST_PREFETCH_W(p) ((void)0)
    #endif
    #ifdef _OPENMP
    #include <omp.h>
    #define FASTMST_OMP_MAX_THREADS() omp_get_max_threads()
    #else
    #define FASTMST_OMP_MAX_THREADS() 0
    #endif
    """
    # Borůvka: lowest edge per component by compare-and-swap
    bint cas64 "fastmst_cas64"(int64_t* p, int64_t expected, int64_t desired) noexcept nogil
    int64_t load64 "fastmst_load64"(const int64_t* p) noexcept nogil
    void load_relaxed "FASTMST_LOAD_RELAXED"(...) noexcept nogil
    void store_relaxed "FASTMST_STORE_RELAXED"(...) noexcept nogil
    # Cache hints: read (scans, label tables) and write (Borůvka's hints)
    void prefetch "FASTMST_PREFETCH"(const void* p) noexcept nogil
    void prefetch_w "FASTMST_PREFETCH_W"(const void* p) noexcept nogil
    # Filter-Kruskal: buckets claimed by the sort-ahead helpers
    bint claim8 "fastmst_claim8"(uint8_t* p, uint8_t expected, uint8_t desired) noexcept nogil
    uint8_t get8 "fastmst_get8"(const uint8_t* p) noexcept nogil
    void put8 "fastmst_put8"(uint8_t* p, uint8_t v) noexcept nogil
    Py_ssize_t getz "fastmst_getz"(const Py_ssize_t* p) noexcept nogil
    void putz "fastmst_putz"(Py_ssize_t* p, Py_ssize_t v) noexcept nogil
    void yield_cpu "FASTMST_YIELD"() noexcept nogil
    # The OpenMP default team size (OMP_NUM_THREADS, omp_set_num_threads as threadpoolctl
    # calls it); 0 in a build without OpenMP
    int omp_max_threads "FASTMST_OMP_MAX_THREADS"() noexcept nogil
