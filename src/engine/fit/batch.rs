//! Elementary functions (`exp`, `ln`) written so that a loop over many points compiles to
//! vector instructions, for models evaluated at every data point of a fit.
//!
//! The library `exp` is a call per value that the compiler cannot unroll
//! into vector lanes; [`exp`] here is branch-free straight-line arithmetic on
//! `f64` and its bits, so a loop calling it runs several points per
//! instruction (two with the baseline x86-64 instructions, four where the
//! calling loop is compiled for AVX2). No fused multiply-add is used, so
//! every instruction set gives the same bits.
//!
//! Method (Cody & Waite 1980, *Software Manual for the Elementary
//! Functions*, ch. 6): `x = m ln 2 + r` with `m` the integer nearest
//! `x / ln 2` and `|r| <= ln 2 / 2`, `ln 2` split into a head with trailing
//! zero bits (so `m ln2_head` is exact) and a tail; `exp r` by its Taylor
//! series to `r^13 / 13!` (remainder below `2e-18` for `|r| <= 0.347`),
//! summed by Estrin's scheme;
//! `2^m` built in the exponent bits, as two factors `2^m1 2^m2` so that
//! results down to the smallest subnormal come out without an overflow of
//! the exponent field. Arguments beyond the range of `f64` results are
//! clamped first (`exp x` is then `inf` or `0` anyway); NaN stays NaN.
//! Accuracy: within 1 unit in the last place of the correctly rounded
//! value for normal results (tested against the library `exp`).

/// `ln 2` split for exact products with `m` up to `2^11`: the head has its
/// low 32 bits zero (the split of fdlibm's `exp`), the tail is the rest.
const LN2_HEAD: f64 = f64::from_bits(0x3fe6_2e42_fee0_0000);
const LN2_TAIL: f64 = f64::from_bits(0x3dea_39ef_3579_3c76);

/// `1.5 * 2^52`: adding it rounds a number below `2^51` to an integer, which
/// then sits in the low bits of the sum.
const ROUND_SHIFT: f64 = 6_755_399_441_055_744.0;

/// Arguments are clamped to this range: below it `exp x` rounds to 0, above
/// it to infinity, and inside it `m` stays within `[-1076, 1024]`.
const LEAST_ARGUMENT: f64 = -746.0;
const GREATEST_ARGUMENT: f64 = 710.0;

/// `1 / k!` for `k` = 2 to 13, the Taylor coefficients after `1 + r`.
const TAYLOR: [f64; 12] = taylor_coefficients();

const fn taylor_coefficients() -> [f64; 12] {
    let mut c = [0.0; 12];
    let mut factorial = 1.0;
    let mut k = 2;
    while k <= 13 {
        factorial *= k as f64;
        c[k - 2] = 1.0 / factorial;
        k += 1;
    }
    c
}

/// `e^x`, branch-free (see the module documentation); inlined into the
/// caller's loop so that the loop vectorises.
#[inline(always)]
pub fn exp(x: f64) -> f64 {
    // NaN passes through and makes the polynomial NaN (the integer part is
    // then meaningless but harmless).
    let x = x.clamp(LEAST_ARGUMENT, GREATEST_ARGUMENT);
    let shifted = x * std::f64::consts::LOG2_E + ROUND_SHIFT;
    let m_float = shifted - ROUND_SHIFT;
    let m = (shifted.to_bits() as i64).wrapping_sub(ROUND_SHIFT.to_bits() as i64);
    let r = (x - m_float * LN2_HEAD) - m_float * LN2_TAIL;
    // Estrin's scheme: short dependency chains, so that the points of a
    // loop overlap in the processor instead of waiting on each other.
    let c = &TAYLOR;
    let r2 = r * r;
    let r4 = r2 * r2;
    let r8 = r4 * r4;
    let q0 = (c[0] + c[1] * r) + (c[2] + c[3] * r) * r2;
    let q1 = (c[4] + c[5] * r) + (c[6] + c[7] * r) * r2;
    let q2 = (c[8] + c[9] * r) + (c[10] + c[11] * r) * r2;
    let q = (q0 + q1 * r4) + q2 * r8;
    let e = 1.0 + (r + r2 * q);
    // m in [-1076, 1024]: m1 = floor((m + 1076) / 2) - 538 and m2 = m - m1
    // both lie in [-538, 512], so each power of two is a normal number.
    let m1 = ((m.wrapping_add(1076) as u64) >> 1) as i64 - 538;
    let m2 = m.wrapping_sub(m1);
    e * power_of_two(m1) * power_of_two(m2)
}

/// `2^m` for `m` in the normal exponent range, built from its bits.
#[inline(always)]
fn power_of_two(m: i64) -> f64 {
    f64::from_bits((m.wrapping_add(1023) as u64) << 52)
}

/// `2 / (2k + 1)` for `k` = 1 to 10, the series of `2 atanh s / s - 2` in `s^2`.
const ATANH_SERIES: [f64; 10] = atanh_coefficients();

const fn atanh_coefficients() -> [f64; 10] {
    let mut c = [0.0; 10];
    let mut k = 1;
    while k <= 10 {
        c[k - 1] = 2.0 / (2 * k + 1) as f64;
        k += 1;
    }
    c
}

/// `ln x`, branch-free; inlined into the caller's loop so that it vectorises.
///
/// Method: `x = 2^e m` with `m` in `[sqrt(1/2), sqrt(2))` (subnormal `x`
/// first scaled by `2^54`); with `f = m - 1` (exact) and `s = f / (2 + f)`,
/// `ln m = 2 atanh s = f - s (f - T)`, `T = sum 2 s^(2k) / (2k + 1)` (since
/// `2 s = f - s f`), to `k = 10` (remainder below `1e-18` for
/// `|s| <= 0.172`); then `ln x = e ln2_head + (f + (e ln2_tail - s (f - T)))`.
/// `ln 0 = -inf`, `ln inf = inf`, NaN for negative `x` and NaN. Accuracy:
/// within 1 unit in the last place of the correctly rounded value (tested
/// against the library `ln`).
#[inline(always)]
pub fn ln(x: f64) -> f64 {
    let subnormal = x < f64::MIN_POSITIVE;
    let normal = if subnormal { x * TWO_TO_54 } else { x };
    let bias = if subnormal { 1023 + 54 } else { 1023 };
    let (e, f, s, z) = reduce(normal.to_bits(), bias);
    let c = &ATANH_SERIES;
    let z2 = z * z;
    let z4 = z2 * z2;
    let z8 = z4 * z4;
    let t0 = (c[0] + c[1] * z) + (c[2] + c[3] * z) * z2;
    let t1 = (c[4] + c[5] * z) + (c[6] + c[7] * z) * z2;
    let t2 = c[8] + c[9] * z;
    let t = z * ((t0 + t1 * z4) + t2 * z8);
    let value = e * LN2_HEAD + (f + (e * LN2_TAIL - s * (f - t)));
    if x == 0.0 {
        f64::NEG_INFINITY
    } else if x == f64::INFINITY {
        x
    } else if x > 0.0 {
        value
    } else {
        f64::NAN
    }
}

/// The reduction [`ln`] and [`ln_for_start`] share, for the bits of a
/// normal `x = 2^e m` scaled so that its biased exponent less `bias` is `e`:
/// `m` taken into [sqrt(1/2), sqrt(2)), and `(e, f, s, z)` with `e` as a
/// float, `f = m - 1`, `s = f / (2 + f)` and `z = s^2`.
#[inline(always)]
fn reduce(bits: u64, bias: i64) -> (f64, f64, f64, f64) {
    const MANTISSA: u64 = (1 << 52) - 1;
    let exponent = ((bits >> 52) & 0x7ff) as i64 - bias;
    let mantissa = f64::from_bits((bits & MANTISSA) | 1.0f64.to_bits());
    let high = mantissa > std::f64::consts::SQRT_2;
    let m = if high { 0.5 * mantissa } else { mantissa };
    let e = exponent + high as i64;
    // e as f64 through the bits (no vector conversion of 64-bit integers
    // before AVX-512).
    let e = f64::from_bits((ROUND_SHIFT.to_bits() as i64).wrapping_add(e) as u64) - ROUND_SHIFT;
    let f = m - 1.0;
    let s = f / (2.0 + f);
    (e, f, s, s * s)
}

/// `ln x` to about 1e-12 relative for normal `x > 0`, for start values
/// only: [`ln`]'s method with the series cut after `s^12` (remainder below
/// `z^7 / 15 <= 1.3e-12` of the value, `z = s^2 <= 0.0295`), and without
/// its handling of subnormal numbers, zero, infinity and negative numbers
/// (which give some finite or NaN value: the caller masks them).
#[inline(always)]
pub fn ln_for_start(x: f64) -> f64 {
    let (e, f, s, z) = reduce(x.to_bits(), 1023);
    let c = &ATANH_SERIES;
    let z2 = z * z;
    let t = z * ((c[0] + c[1] * z) + (c[2] + c[3] * z) * z2 + (c[4] + c[5] * z) * (z2 * z2));
    e * LN2_HEAD + (f + (e * LN2_TAIL - s * (f - t)))
}

/// Defines `$name`, which runs the portable loop `$body` (an
/// `#[inline(always)]` function, so its loop is compiled into each caller)
/// through copies of it compiled for AVX-512F or AVX2 when the processor has
/// them (detected at run time), else as it is. No fused multiply-add is
/// enabled, so every copy gives the same bits. Generic parameters go in
/// brackets after the name, their arguments after `=>`:
/// `fn sums[const P: usize](y: &[f64]) -> f64 => lane_sums::<P>;`.
macro_rules! widest_vectors {
    (
        $(#[$meta:meta])*
        $vis:vis fn $name:ident $([$($generic:tt)*])? ($($arg:ident: $ty:ty),* $(,)?) $(-> $ret:ty)?
        => $body:ident $(::<$($targ:tt),*>)?;
    ) => {
        $(#[$meta])*
        $vis fn $name $(<$($generic)*>)? ($($arg: $ty),*) $(-> $ret)? {
            #[cfg(target_arch = "x86_64")]
            {
                #[target_feature(enable = "avx512f")]
                fn avx512 $(<$($generic)*>)? ($($arg: $ty),*) $(-> $ret)? {
                    $body $(::<$($targ),*>)? ($($arg),*)
                }
                #[target_feature(enable = "avx2")]
                fn avx2 $(<$($generic)*>)? ($($arg: $ty),*) $(-> $ret)? {
                    $body $(::<$($targ),*>)? ($($arg),*)
                }
                if std::arch::is_x86_feature_detected!("avx512f") {
                    // SAFETY: the processor has AVX-512F, checked just above.
                    return unsafe { avx512 $(::<$($targ),*>)? ($($arg),*) };
                }
                if std::arch::is_x86_feature_detected!("avx2") {
                    // SAFETY: the processor has AVX2, checked just above.
                    return unsafe { avx2 $(::<$($targ),*>)? ($($arg),*) };
                }
            }
            $body $(::<$($targ),*>)? ($($arg),*)
        }
    };
}
pub(crate) use widest_vectors;

/// `2^54`, to bring subnormal numbers into the normal range.
const TWO_TO_54: f64 = 18_014_398_509_481_984.0;

#[cfg(test)]
mod tests {
    use super::*;

    /// Distance in units in the last place (representable numbers between).
    fn ulps(a: f64, b: f64) -> u64 {
        let key = |v: f64| {
            let bits = v.to_bits() as i64;
            if bits < 0 {
                i64::MIN - bits
            } else {
                bits
            }
        };
        key(a).abs_diff(key(b))
    }

    /// Against the library `exp` (glibc's, correctly rounded in all but rare
    /// cases) on a dense grid over the whole range and a pseudo-random sample.
    #[test]
    fn matches_library_exp_within_one_ulp() {
        let mut worst = (0, 0.0);
        let mut check = |x: f64| {
            let (ours, library) = (exp(x), x.exp());
            let d = ulps(ours, library);
            // Subnormal results carry fewer digits: allow one more rounding.
            let allowed = if library < f64::MIN_POSITIVE { 2 } else { 1 };
            assert!(
                d <= allowed,
                "exp({x:e}) = {ours:e}, library {library:e}, {d} ulps"
            );
            if d > worst.0 {
                worst = (d, x);
            }
        };
        let steps = 2_000_000;
        for i in 0..=steps {
            check(-760.0 + 1480.0 * i as f64 / steps as f64);
        }
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        for _ in 0..1_000_000 {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            let unit = (state >> 11) as f64 / (1u64 << 53) as f64;
            check(-40.0 + 80.0 * unit);
            check((unit - 0.5) * 1e-6);
        }
        for x in [
            0.0,
            -0.0,
            1.0,
            -1.0,
            1e-300,
            -1e-300,
            0.5 * std::f64::consts::LN_2,
        ] {
            check(x);
        }
    }

    /// The start values' `ln` against the library's, relative 2e-12, over
    /// moisture ratios and the logarithms of their logarithms' range.
    #[test]
    fn ln_for_start_is_close_to_library_ln() {
        let check = |x: f64| {
            let (ours, library) = (ln_for_start(x), x.ln());
            assert!(
                (ours - library).abs() <= 2e-12 * library.abs() + 1e-300,
                "ln({x:e}) = {ours:e}, library {library:e}"
            );
        };
        let steps = 200_000;
        for i in 1..steps {
            check(i as f64 / steps as f64);
            check(1.0 + 800.0 * i as f64 / steps as f64);
            check(1e-300f64.powf(i as f64 / steps as f64));
        }
        check(1.0 - f64::EPSILON);
        check(f64::MIN_POSITIVE);
    }

    #[test]
    fn edges_of_the_range() {
        assert_eq!(exp(0.0), 1.0);
        assert_eq!(exp(f64::NEG_INFINITY), 0.0);
        assert_eq!(exp(-746.0), 0.0);
        assert_eq!(exp(-1e308), 0.0);
        assert_eq!(exp(f64::INFINITY), f64::INFINITY);
        assert_eq!(exp(709.8), f64::INFINITY);
        assert_eq!(exp(1e308), f64::INFINITY);
        assert!(exp(f64::NAN).is_nan());
        // The largest finite result and the smallest subnormal ones.
        assert_eq!(exp(709.78), 709.78_f64.exp());
        assert!(exp(-745.0) > 0.0 && exp(-745.0) == (-745.0_f64).exp());
        assert!(ulps(exp(-744.0), (-744.0_f64).exp()) <= 2);
        assert!(ulps(exp(-708.5), (-708.5_f64).exp()) <= 2);
    }

    /// Against the library `ln` on a grid near 1 (where the digits cancel),
    /// a sample over the whole range including subnormal numbers, and the
    /// edge values.
    #[test]
    fn ln_matches_library_within_one_ulp() {
        let check = |x: f64| {
            let (ours, library) = (ln(x), x.ln());
            let d = ulps(ours, library);
            assert!(
                d <= 1,
                "ln({x:e}) = {ours:e}, library {library:e}, {d} ulps"
            );
        };
        let steps = 1_000_000;
        for i in 1..=steps {
            check(0.5 + 1.5 * i as f64 / steps as f64);
            check(1e-3 * i as f64);
        }
        let mut state = 0x9e37_79b9_7f4a_7c15_u64;
        for _ in 0..1_000_000 {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            // Any positive finite f64 (random exponent and mantissa).
            let x = f64::from_bits(state >> 1);
            if x.is_finite() && x > 0.0 {
                check(x);
            }
        }
        for x in [
            f64::MIN_POSITIVE,
            5e-324,
            f64::MAX,
            1.0,
            2.0,
            0.5,
            1.0 + f64::EPSILON,
        ] {
            check(x);
        }
        assert_eq!(ln(1.0), 0.0);
        assert_eq!(ln(0.0), f64::NEG_INFINITY);
        assert_eq!(ln(-0.0), f64::NEG_INFINITY);
        assert_eq!(ln(f64::INFINITY), f64::INFINITY);
        assert!(ln(-1.0).is_nan() && ln(f64::NAN).is_nan() && ln(f64::NEG_INFINITY).is_nan());
    }
}
