//go:build linux && cgo

package main

/*
#include <malloc.h>

// limitArenas keeps glibc's allocator to two arenas. SQLite allocates its
// page caches from whichever OS thread a cgo call lands on; with one arena
// per thread, memory freed in one is not reused by the others and a long
// scan's resident size creeps up.
static void limitArenas(void) {
#ifdef M_ARENA_MAX
	mallopt(M_ARENA_MAX, 2);
#endif
}
*/
import "C"

func init() { C.limitArenas() }
