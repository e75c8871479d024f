//! The global allocator: mimalloc, through its C interface.
//!
//! A what-if study makes and frees a few small values at each of its
//! thousands of points (a record's fields, a point's outcome). mimalloc
//! serves those from per-thread free lists in fewer instructions than the C
//! library's allocator, and keeps the memory it got from the system for the
//! next study instead of handing large blocks back and faulting them in again.
//!
//! Layouts whose alignment every mimalloc block already has (a machine word:
//! blocks come in sizes that are multiples of 8 bytes from pages that start
//! aligned) take the plain calls; the aligned calls serve only the rest.
//! (mimalloc's own aligned call also takes the plain path for a word, but
//! only after working out the block's size class: for a 24-byte block it
//! takes a longer path of about 130 instructions.)

use std::alloc::{GlobalAlloc, Layout};
use std::ffi::c_void;

use libmimalloc_sys::{
    mi_free, mi_malloc, mi_malloc_aligned, mi_realloc, mi_realloc_aligned, mi_zalloc,
    mi_zalloc_aligned,
};

/// The alignment of every block mimalloc hands out.
const PLAIN_ALIGN: usize = std::mem::size_of::<usize>();

/// mimalloc as a [`GlobalAlloc`].
pub struct Mimalloc;

/// True when a plain (unaligned) call gives a block aligned enough for `layout`.
#[inline]
fn plain(layout: &Layout) -> bool {
    layout.align() <= PLAIN_ALIGN
}

// SAFETY: each method forwards to the mimalloc call that meets the
// `GlobalAlloc` contract for the layout: blocks of at least `size` bytes
// aligned to `align` (every block to a word, the aligned calls to any power
// of two), or null on failure; frees and reallocations take only pointers it
// gave.
unsafe impl GlobalAlloc for Mimalloc {
    #[inline]
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        if plain(&layout) {
            // SAFETY: see the impl.
            unsafe { mi_malloc(layout.size()) as *mut u8 }
        } else {
            // SAFETY: see the impl.
            unsafe { mi_malloc_aligned(layout.size(), layout.align()) as *mut u8 }
        }
    }

    #[inline]
    unsafe fn alloc_zeroed(&self, layout: Layout) -> *mut u8 {
        if plain(&layout) {
            // SAFETY: see the impl.
            unsafe { mi_zalloc(layout.size()) as *mut u8 }
        } else {
            // SAFETY: see the impl.
            unsafe { mi_zalloc_aligned(layout.size(), layout.align()) as *mut u8 }
        }
    }

    #[inline]
    unsafe fn dealloc(&self, ptr: *mut u8, _layout: Layout) {
        // SAFETY: `ptr` came from this allocator (the caller's contract).
        unsafe { mi_free(ptr as *mut c_void) }
    }

    #[inline]
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        if plain(&layout) {
            // SAFETY: see the impl; `ptr` came from this allocator.
            unsafe { mi_realloc(ptr as *mut c_void, new_size) as *mut u8 }
        } else {
            // SAFETY: see the impl; `ptr` came from this allocator.
            unsafe { mi_realloc_aligned(ptr as *mut c_void, new_size, layout.align()) as *mut u8 }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Blocks of every small size and alignment are aligned, writable and
    /// keep their bytes through a reallocation (both paths of [`plain`]).
    #[test]
    fn blocks_are_aligned_and_keep_their_bytes() {
        let a = Mimalloc;
        for align in [1, 2, 4, 8, 16, 32, 64, 4096] {
            for size in [1, 3, 7, 8, 15, 16, 17, 24, 100, 4097, 70_000] {
                let layout = Layout::from_size_align(size, align).expect("layout");
                // SAFETY: a non-zero size; the block is freed below with its layout.
                unsafe {
                    let p = a.alloc(layout);
                    assert!(!p.is_null());
                    assert_eq!(p as usize % align, 0, "size {size} align {align}");
                    for i in 0..size {
                        *p.add(i) = i as u8;
                    }
                    let q = a.realloc(p, layout, size * 3);
                    assert_eq!(q as usize % align, 0, "size {size} align {align}");
                    for i in 0..size {
                        assert_eq!(*q.add(i), i as u8);
                    }
                    a.dealloc(q, Layout::from_size_align(size * 3, align).expect("layout"));
                    let z = a.alloc_zeroed(layout);
                    assert_eq!(z as usize % align, 0);
                    assert!((0..size).all(|i| *z.add(i) == 0));
                    a.dealloc(z, layout);
                }
            }
        }
    }
}
