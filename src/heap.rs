//! Hands freed heap memory back to the operating system between stages.
//!
//! Reading, noding and solving a national layer free several hundred megabytes of working arrays
//! before writing starts, but the C allocator keeps most of those pages mapped: the holes sit
//! between blocks still in use, where it does not return memory on its own. The writers then
//! allocate on top, and the process's peak counts both. Asking the allocator to release every
//! whole free page lowers the peak of a 1,000,000-feature plan by about an eighth
//! (docs/benchmarks.md).

/// Returns the pages of freed heap blocks to the operating system (GNU C library only; a no-op
/// elsewhere). Cheap next to the stages it separates: it walks the allocator's free lists once.
pub fn release_freed() {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        unsafe extern "C" {
            // glibc: `int malloc_trim(size_t pad)`, declared in <malloc.h>.
            fn malloc_trim(pad: usize) -> std::ffi::c_int;
        }
        // SAFETY: malloc_trim takes no pointers and only releases pages no allocation uses; it
        // takes the allocator's own locks, so other threads may allocate meanwhile.
        unsafe {
            malloc_trim(0);
        }
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn releasing_keeps_live_memory_intact() {
        let kept: Vec<Vec<u8>> = (0..64u8).map(|i| vec![i; 100_000]).collect();
        let freed: Vec<Vec<u8>> = (0..64u8).map(|i| vec![i; 100_000]).collect();
        drop(freed);
        super::release_freed();
        for (i, v) in kept.iter().enumerate() {
            assert!(v.iter().all(|&b| usize::from(b) == i));
        }
    }
}
