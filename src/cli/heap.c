/* heap.c — the allocator policy of the trope program (not of the library).
 *
 * Page faults are what large runs spend most of their system time on: a first touch
 * of a 4 KiB page costs 10-15 us on the virtual machines we measured (2026-12, 2 cores,
 * 256 MiB touched in 0.9-1.0 s), against 0.2-8 us per 4 KiB when the kernel can back
 * the range with a 2 MiB transparent huge page. So, with glibc on Linux:
 *
 *   - freed memory stays in the heap for reuse (no trimming, and blocks up to 32 MiB,
 *     glibc's ceiling, come from the heap rather than a fresh mmap each time);
 *   - the heap is extended once by a reservation of address space (untouched pages
 *     cost nothing and do not count as resident), and that range is marked for
 *     transparent huge pages (MADV_HUGEPAGE; with THP in "madvise" or "always" mode).
 *
 * Everything here is advice: any failing call leaves the default policy in place, and
 * other C libraries or sanitizer runtimes (which bring their own allocator) skip it.
 * TROPE_HEAP=plain turns it off (for comparisons).
 */
#include "common.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#if defined(__linux__) && defined(__GLIBC__)
#include <malloc.h>
#include <sys/mman.h>
#include <unistd.h>

#define RESERVE ((size_t)1 << 30)      /* address space, not memory */
#define HUGE_PAGE ((uintptr_t)2 << 20)

void cli_tune_heap(void)
{
    const char *env = getenv("TROPE_HEAP");
    if (env && strcmp(env, "plain") == 0)
        return;
    if (mallopt(M_TRIM_THRESHOLD, INT32_MAX) != 1 || mallopt(M_MMAP_THRESHOLD, 32 << 20) != 1)
        return;
    /* One sbrk of RESERVE: the top pad applies to the next heap extension. Advise
     * only if the break really moved by that much around our block (a heap that could
     * not grow in place, or an allocator of its own, leaves it where it was). */
    uintptr_t b0 = (uintptr_t)sbrk(0);
    if (mallopt(M_TOP_PAD, (int)RESERVE) != 1)
        return;
    void *probe = malloc((size_t)64 << 10);
    mallopt(M_TOP_PAD, 1 << 20);
    if (!probe)
        return;
    uintptr_t b1 = (uintptr_t)sbrk(0), p = (uintptr_t)probe;
    if (b1 > b0 && b1 - b0 >= RESERVE && p >= b0 && p < b1) {
        uintptr_t lo = (p + ((uintptr_t)64 << 10) + HUGE_PAGE - 1) & ~(HUGE_PAGE - 1);
        uintptr_t hi = b1 & ~(HUGE_PAGE - 1);
        if (hi > lo)
            (void)madvise((void *)lo, hi - lo, MADV_HUGEPAGE);
    }
    free(probe);
}
#else
void cli_tune_heap(void)
{
}
#endif
