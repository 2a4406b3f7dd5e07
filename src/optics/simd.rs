//! Wider vector instructions where the processor has them: the lane kernels
//! are compiled a second time for AVX2 and chosen at run time. No fused
//! multiply-add is enabled, so both variants give the same bits.

/// Runs `f` compiled for AVX2 when the processor supports it, else as is.
/// `f` and what it inlines are compiled for the wider instructions.
#[inline(always)]
pub(super) fn with_wide_vectors<R>(f: impl FnOnce() -> R) -> R {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the processor has just been found to support AVX2.
        return unsafe { avx2(f) };
    }
    f()
}

/// `f()` compiled with AVX2 enabled.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
fn avx2<R>(f: impl FnOnce() -> R) -> R {
    f()
}
