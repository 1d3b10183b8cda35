//! The per-frequency solve of [`super::frequency_response`]: Gaussian elimination with
//! partial pivoting on `sI − H` (H upper Hessenberg) for 8 (AVX-512F), 4 (AVX2 + FMA) or
//! 1 frequencies at once, one per SIMD lane, with the output map applied while the rows
//! are produced.
//!
//! # Purpose
//! `G(s) = C̃ (sI − H)⁻¹ B̃ + D` at many points s in O(n² (1 + p)) real operations per
//! point, without storing the triangular factor.
//!
//! # Method
//! Per column k the current row (row k of the partly eliminated matrix, complex) and row
//! k + 1 of `sI − H` (real except its diagonal entry) are compared at column k; the larger
//! (by |re| + |im|, as in the scalar elimination) is row k of U, the other is reduced by it
//! and becomes the next current row (Wilkinson's elimination of a Hessenberg matrix, one
//! row operation per column). The right-hand sides follow the same operations, so
//! `y = L⁻¹ P B̃` is produced entry by entry. Instead of a back substitution with U, the
//! row vectors `z_qᵀ = c̃_qᵀ U⁻¹` are built forward by columns: when row k of U is final,
//! `z_q[k] = acc_q[k] / U[k, k]` and `acc_q[j] −= z_q[k] U[k, j]` for j > k (accumulators
//! started at c̃_q). Then `G[q, r] = Σ_k z_q[k] y_r[k]`, summed as the steps run: no array
//! of U, z or y is kept. For a single output two consecutive steps share one pass over the
//! columns (both row operations per column in registers, the same operations per value).
//! The lanes of one block run the same instructions (the pivot choice is a per-lane
//! select; the instruction set is chosen at run time); every lane depends only on its own
//! frequency, so a result does not depend on the block it was computed in, on the thread
//! or on the instruction set (the fused multiply-adds are correctly rounded on every path:
//! AVX2 + FMA, AVX-512F, or `f64::mul_add` elsewhere).
//!
//! # Numerical aspects
//! The same elimination as the scalar one (partial pivoting on a Hessenberg matrix, growth
//! factor at most n): backward stable. `c̃ᵀ U⁻¹` by columns is forward substitution with
//! Uᵀ, backward stable as the back substitution it replaces. A lane is flagged at a pole
//! when a pivot's modulus is at or below its tolerance (`n eps (‖H‖₁ + |s|)`, given by the
//! caller). One more accumulator row solves `w U = e` with `e_k` of modulus at most 1
//! chosen along the running sum (LINPACK's condition estimator), and `max_k |w_k|` is
//! returned in [`LaneWork::growth`] for the caller's condition test. The pivot moduli and
//! the complex reciprocals are computed with scaling, so no intermediate under- or
//! overflows for representable pivots.
//!
//! # References
//! J. H. Wilkinson, *The Algebraic Eigenvalue Problem*, 1965 (Gaussian elimination on
//! Hessenberg matrices). A. J. Laub, IEEE Trans. Automat. Control 26 (1981) 407–408.

use std::ops::{Add, Mul, Sub};

/// The largest number of frequencies per block (one AVX-512 register of doubles).
pub(super) const MAX_LANES: usize = 8;

/// Storage of one lane vector.
type Lane = [f64; MAX_LANES];

/// A vector of `W` doubles, one lane per frequency, and its lane-wise operations. Every
/// operation is the correctly rounded IEEE one of each lane (fused multiply-adds rounded
/// once), so all implementations give the same bits.
trait Lanes: Copy + Add<Output = Self> + Sub<Output = Self> + Mul<Output = Self> {
    const W: usize;
    type Mask: Copy;
    fn splat(x: f64) -> Self;
    fn load(p: &Lane) -> Self;
    fn store(self, p: &mut Lane);
    fn div(self, o: Self) -> Self;
    /// `self · b + c`, rounded once.
    fn mul_add(self, b: Self, c: Self) -> Self;
    /// `c − self · b`, rounded once.
    fn neg_mul_add(self, b: Self, c: Self) -> Self;
    fn sqrt(self) -> Self;
    fn abs(self) -> Self;
    fn max(self, o: Self) -> Self;
    fn min(self, o: Self) -> Self;
    /// `self > o` per lane.
    fn gt(self, o: Self) -> Self::Mask;
    /// `self <= o` per lane.
    fn le(self, o: Self) -> Self::Mask;
    /// `m ? a : b` per lane.
    fn select(m: Self::Mask, a: Self, b: Self) -> Self;
}

impl Lanes for f64 {
    const W: usize = 1;
    type Mask = bool;
    #[inline(always)]
    fn splat(x: f64) -> Self {
        x
    }
    #[inline(always)]
    fn load(p: &Lane) -> Self {
        p[0]
    }
    #[inline(always)]
    fn store(self, p: &mut Lane) {
        p[0] = self;
    }
    #[inline(always)]
    fn div(self, o: Self) -> Self {
        self / o
    }
    #[inline(always)]
    fn mul_add(self, b: Self, c: Self) -> Self {
        f64::mul_add(self, b, c)
    }
    #[inline(always)]
    fn neg_mul_add(self, b: Self, c: Self) -> Self {
        f64::mul_add(-self, b, c)
    }
    #[inline(always)]
    fn sqrt(self) -> Self {
        f64::sqrt(self)
    }
    #[inline(always)]
    fn abs(self) -> Self {
        f64::abs(self)
    }
    #[inline(always)]
    fn max(self, o: Self) -> Self {
        if self >= o {
            self
        } else {
            o
        }
    }
    #[inline(always)]
    fn min(self, o: Self) -> Self {
        if self <= o {
            self
        } else {
            o
        }
    }
    #[inline(always)]
    fn gt(self, o: Self) -> bool {
        self > o
    }
    #[inline(always)]
    fn le(self, o: Self) -> bool {
        self <= o
    }
    #[inline(always)]
    fn select(m: bool, a: Self, b: Self) -> Self {
        if m {
            a
        } else {
            b
        }
    }
}

#[cfg(target_arch = "x86_64")]
mod x86 {
    //! AVX2 with FMA (4 lanes) and AVX-512F (8 lanes) vectors. Values of these types are made only
    //! inside functions compiled for, and called after detecting, the instruction set.
    use super::{Lane, Lanes};
    use std::arch::x86_64::*;
    use std::ops::{Add, Mul, Sub};

    #[derive(Clone, Copy)]
    pub(super) struct V4(__m256d);
    #[derive(Clone, Copy)]
    pub(super) struct V8(__m512d);

    macro_rules! ops {
        ($t:ident, $add:ident, $sub:ident, $mul:ident) => {
            impl Add for $t {
                type Output = $t;
                #[inline(always)]
                fn add(self, o: $t) -> $t {
                    // SAFETY: see the module doc (the instruction set is present).
                    $t(unsafe { $add(self.0, o.0) })
                }
            }
            impl Sub for $t {
                type Output = $t;
                #[inline(always)]
                fn sub(self, o: $t) -> $t {
                    // SAFETY: as above.
                    $t(unsafe { $sub(self.0, o.0) })
                }
            }
            impl Mul for $t {
                type Output = $t;
                #[inline(always)]
                fn mul(self, o: $t) -> $t {
                    // SAFETY: as above.
                    $t(unsafe { $mul(self.0, o.0) })
                }
            }
        };
    }
    ops!(V4, _mm256_add_pd, _mm256_sub_pd, _mm256_mul_pd);
    ops!(V8, _mm512_add_pd, _mm512_sub_pd, _mm512_mul_pd);

    // SAFETY (every method below): the instruction set is present (module doc); loads and
    // stores are unaligned, within an array of MAX_LANES doubles.
    impl Lanes for V4 {
        const W: usize = 4;
        type Mask = __m256d;
        #[inline(always)]
        fn splat(x: f64) -> Self {
            V4(unsafe { _mm256_set1_pd(x) })
        }
        #[inline(always)]
        fn load(p: &Lane) -> Self {
            V4(unsafe { _mm256_loadu_pd(p.as_ptr()) })
        }
        #[inline(always)]
        fn store(self, p: &mut Lane) {
            unsafe { _mm256_storeu_pd(p.as_mut_ptr(), self.0) }
        }
        #[inline(always)]
        fn div(self, o: Self) -> Self {
            V4(unsafe { _mm256_div_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn mul_add(self, b: Self, c: Self) -> Self {
            V4(unsafe { _mm256_fmadd_pd(self.0, b.0, c.0) })
        }
        #[inline(always)]
        fn neg_mul_add(self, b: Self, c: Self) -> Self {
            V4(unsafe { _mm256_fnmadd_pd(self.0, b.0, c.0) })
        }
        #[inline(always)]
        fn sqrt(self) -> Self {
            V4(unsafe { _mm256_sqrt_pd(self.0) })
        }
        #[inline(always)]
        fn abs(self) -> Self {
            V4(unsafe { _mm256_andnot_pd(_mm256_set1_pd(-0.0), self.0) })
        }
        #[inline(always)]
        fn max(self, o: Self) -> Self {
            V4(unsafe { _mm256_max_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn min(self, o: Self) -> Self {
            V4(unsafe { _mm256_min_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn gt(self, o: Self) -> __m256d {
            unsafe { _mm256_cmp_pd::<_CMP_GT_OQ>(self.0, o.0) }
        }
        #[inline(always)]
        fn le(self, o: Self) -> __m256d {
            unsafe { _mm256_cmp_pd::<_CMP_LE_OQ>(self.0, o.0) }
        }
        #[inline(always)]
        fn select(m: __m256d, a: Self, b: Self) -> Self {
            V4(unsafe { _mm256_blendv_pd(b.0, a.0, m) })
        }
    }

    impl Lanes for V8 {
        const W: usize = 8;
        type Mask = __mmask8;
        #[inline(always)]
        fn splat(x: f64) -> Self {
            V8(unsafe { _mm512_set1_pd(x) })
        }
        #[inline(always)]
        fn load(p: &Lane) -> Self {
            V8(unsafe { _mm512_loadu_pd(p.as_ptr()) })
        }
        #[inline(always)]
        fn store(self, p: &mut Lane) {
            unsafe { _mm512_storeu_pd(p.as_mut_ptr(), self.0) }
        }
        #[inline(always)]
        fn div(self, o: Self) -> Self {
            V8(unsafe { _mm512_div_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn mul_add(self, b: Self, c: Self) -> Self {
            V8(unsafe { _mm512_fmadd_pd(self.0, b.0, c.0) })
        }
        #[inline(always)]
        fn neg_mul_add(self, b: Self, c: Self) -> Self {
            V8(unsafe { _mm512_fnmadd_pd(self.0, b.0, c.0) })
        }
        #[inline(always)]
        fn sqrt(self) -> Self {
            V8(unsafe { _mm512_sqrt_pd(self.0) })
        }
        #[inline(always)]
        fn abs(self) -> Self {
            V8(unsafe { _mm512_abs_pd(self.0) })
        }
        #[inline(always)]
        fn max(self, o: Self) -> Self {
            V8(unsafe { _mm512_max_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn min(self, o: Self) -> Self {
            V8(unsafe { _mm512_min_pd(self.0, o.0) })
        }
        #[inline(always)]
        fn gt(self, o: Self) -> __mmask8 {
            unsafe { _mm512_cmp_pd_mask::<_CMP_GT_OQ>(self.0, o.0) }
        }
        #[inline(always)]
        fn le(self, o: Self) -> __mmask8 {
            unsafe { _mm512_cmp_pd_mask::<_CMP_LE_OQ>(self.0, o.0) }
        }
        #[inline(always)]
        fn select(m: __mmask8, a: Self, b: Self) -> Self {
            V8(unsafe { _mm512_mask_blend_pd(m, b.0, a.0) })
        }
    }
}

/// The model data of the solve (row-major H, column-major B̃, row-major C̃).
pub(super) struct LaneModel<'a> {
    pub n: usize,
    pub m: usize,
    pub p: usize,
    pub h: &'a [f64],
    pub b: &'a [f64],
    pub c: &'a [f64],
}

/// Scratch space of one thread, one lane vector per entry.
pub(super) struct LaneWork {
    cur_re: Vec<Lane>,
    cur_im: Vec<Lane>,
    acc_re: Vec<Lane>,
    acc_im: Vec<Lane>,
    rhs_re: Vec<Lane>,
    rhs_im: Vec<Lane>,
    z_re: Vec<Lane>,
    z_im: Vec<Lane>,
    /// `C̃ (sI − H)⁻¹ B̃`, entry q·m + r.
    pub g_re: Vec<Lane>,
    pub g_im: Vec<Lane>,
    /// `max_k |w_k|` (|re| + |im|) of the condition estimator `w U = e`: a lower bound of
    /// `‖U⁻¹‖₁` up to a factor 2.
    pub growth: Lane,
}

impl LaneWork {
    pub fn new(n: usize, m: usize, p: usize) -> Self {
        let v = |len: usize| vec![[0.0; MAX_LANES]; len];
        LaneWork {
            cur_re: v(n),
            cur_im: v(n),
            // One accumulator row per output and one for the condition estimator.
            acc_re: v(n * (p + 1)),
            acc_im: v(n * (p + 1)),
            rhs_re: v(m),
            rhs_im: v(m),
            z_re: v(p + 1),
            z_im: v(p + 1),
            g_re: v(p * m),
            g_im: v(p * m),
            growth: [0.0; MAX_LANES],
        }
    }
}

/// The number of frequencies the block solve takes at once on this CPU.
pub(super) fn lanes() -> usize {
    #[cfg(target_arch = "x86_64")]
    {
        if std::arch::is_x86_feature_detected!("avx512f") {
            return <x86::V8 as Lanes>::W;
        }
        if std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma")
        {
            return <x86::V4 as Lanes>::W;
        }
    }
    <f64 as Lanes>::W
}

/// Solves one block of [`lanes`] points (`s_re`, `s_im`, pivot tolerances `tol`).
/// Returns, per lane, whether the point is at a pole; the responses are in `w.g_re`,
/// `w.g_im`.
pub(super) fn solve_block(
    model: &LaneModel<'_>,
    s_re: &Lane,
    s_im: &Lane,
    tol: &Lane,
    w: &mut LaneWork,
) -> [bool; MAX_LANES] {
    #[cfg(target_arch = "x86_64")]
    {
        if std::arch::is_x86_feature_detected!("avx512f") {
            // SAFETY: the CPU supports AVX-512F (checked just above).
            return unsafe { solve_avx512(model, s_re, s_im, tol, w) };
        }
        if std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma")
        {
            // SAFETY: the CPU supports AVX2 and FMA (checked just above).
            return unsafe { solve_avx2(model, s_re, s_im, tol, w) };
        }
    }
    solve::<f64>(model, s_re, s_im, tol, w)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f")]
unsafe fn solve_avx512(
    model: &LaneModel<'_>,
    s_re: &Lane,
    s_im: &Lane,
    tol: &Lane,
    w: &mut LaneWork,
) -> [bool; MAX_LANES] {
    solve::<x86::V8>(model, s_re, s_im, tol, w)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn solve_avx2(
    model: &LaneModel<'_>,
    s_re: &Lane,
    s_im: &Lane,
    tol: &Lane,
    w: &mut LaneWork,
) -> [bool; MAX_LANES] {
    solve::<x86::V4>(model, s_re, s_im, tol, w)
}

/// `o − l · x` for complex lanes (two fused multiply-adds per part).
#[inline(always)]
fn minus_product<V: Lanes>(or: V, oi: V, lr: V, li: V, xr: V, xi: V) -> (V, V) {
    (
        li.mul_add(xi, lr.neg_mul_add(xr, or)),
        li.neg_mul_add(xr, lr.neg_mul_add(xi, oi)),
    )
}

/// Step k's pivot: the row choice, the modulus test (into `failed`), the reciprocal and
/// the multiplier; `z_q[k]` into `w.z_*`; the right-hand sides and `G += z y`. Returns the
/// swap mask and the multiplier.
#[inline(always)]
fn pivot_step<V: Lanes>(
    model: &LaneModel<'_>,
    k: usize,
    tl: V,
    failed: &mut V,
    w: &mut LaneWork,
) -> (V::Mask, V, V) {
    let LaneModel { n, m, p, h, b, .. } = *model;
    let zero = V::splat(0.0);
    let one = V::splat(1.0);
    let last = k + 1 == n;
    let (cr, ci) = (V::load(&w.cur_re[k]), V::load(&w.cur_im[k]));
    // The pivot (sw: row k + 1 of sI − H) and the other row's entry at column k.
    let sub = V::splat(if last { 0.0 } else { -h[(k + 1) * n + k] });
    let sw = if last {
        zero.gt(zero)
    } else {
        sub.abs().gt(cr.abs() + ci.abs())
    };
    let (pr, pi) = (V::select(sw, sub, cr), V::select(sw, zero, ci));
    let (or, oi) = (V::select(sw, cr, sub), V::select(sw, ci, zero));
    // |pivot| and 1 / pivot, scaled.
    let (ar, ai) = (pr.abs(), pi.abs());
    let (big, small) = (ar.max(ai), ar.min(ai));
    let ratio = V::select(big.gt(zero), small.div(big), zero);
    let modulus = big * (one + ratio * ratio).sqrt();
    *failed = V::select(modulus.le(tl), one, *failed);
    let (qr, qi) = (pr.div(big), pi.div(big));
    let d = (qr * qr + qi * qi) * big;
    let (ir, ii) = (qr.div(d), zero - qi.div(d));
    let (lr, li) = (or * ir - oi * ii, or * ii + oi * ir);
    // z_q[k] = acc_q[k] / pivot.
    for q in 0..p {
        let (xr, xi) = (V::load(&w.acc_re[q * n + k]), V::load(&w.acc_im[q * n + k]));
        (xr * ir - xi * ii).store(&mut w.z_re[q]);
        (xr * ii + xi * ir).store(&mut w.z_im[q]);
    }
    // The estimator row (row p): e_k of modulus at most 1 along acc[k], so that
    // |e_k + acc[k]| = |e_k| + |acc[k]| (the growth-seeking choice of the LINPACK estimator).
    {
        let (xr, xi) = (V::load(&w.acc_re[p * n + k]), V::load(&w.acc_im[p * n + k]));
        let size = xr.abs() + xi.abs();
        let along = size.gt(zero);
        let (xr, xi) = (
            xr + V::select(along, xr.div(size), one),
            xi + V::select(along, xi.div(size), zero),
        );
        let (er, ei) = (xr * ir - xi * ii, xr * ii + xi * ir);
        er.store(&mut w.z_re[p]);
        ei.store(&mut w.z_im[p]);
        // A NaN |w_k| (overflow on the way) counts as infinite growth.
        let infinite = V::splat(f64::INFINITY);
        let g = er.abs() + ei.abs();
        let g = V::select(g.le(infinite), g, infinite);
        let old = V::load(&w.growth);
        V::select(g.le(old), old, g).store(&mut w.growth);
    }
    // y_r[k], the next right-hand sides, G += z y.
    for r in 0..m {
        let next = V::splat(if last { 0.0 } else { b[r * n + k + 1] });
        let (rr, ri) = (V::load(&w.rhs_re[r]), V::load(&w.rhs_im[r]));
        let (yr, yi) = (V::select(sw, next, rr), V::select(sw, zero, ri));
        let (orr, ori) = (V::select(sw, rr, next), V::select(sw, ri, zero));
        let (nr, ni) = minus_product(orr, ori, lr, li, yr, yi);
        nr.store(&mut w.rhs_re[r]);
        ni.store(&mut w.rhs_im[r]);
        for q in 0..p {
            let (zr, zi) = (V::load(&w.z_re[q]), V::load(&w.z_im[q]));
            let at = q * m + r;
            let (gr, gi) = (V::load(&w.g_re[at]), V::load(&w.g_im[at]));
            zr.mul_add(yr, zi.neg_mul_add(yi, gr))
                .store(&mut w.g_re[at]);
            zr.mul_add(yi, zi.mul_add(yr, gi)).store(&mut w.g_im[at]);
        }
    }
    (sw, lr, li)
}

#[inline(always)]
fn solve<V: Lanes>(
    model: &LaneModel<'_>,
    s_re: &Lane,
    s_im: &Lane,
    tol: &Lane,
    w: &mut LaneWork,
) -> [bool; MAX_LANES] {
    let LaneModel { n, m, p, h, b, c } = *model;
    let zero = V::splat(0.0);
    let (sr, si, tl) = (V::load(s_re), V::load(s_im), V::load(tol));
    let mut failed = zero;
    for g in w.g_re.iter_mut().chain(w.g_im.iter_mut()) {
        *g = [0.0; MAX_LANES];
    }
    w.growth = [0.0; MAX_LANES];
    if n > 0 {
        // Row 0 of sI − H, the accumulators c̃_q, the right-hand sides (row 0 of B̃).
        for j in 0..n {
            let x = V::splat(-h[j]);
            (if j == 0 { x + sr } else { x }).store(&mut w.cur_re[j]);
            (if j == 0 { si } else { zero }).store(&mut w.cur_im[j]);
        }
        for x in 0..p * n {
            V::splat(c[x]).store(&mut w.acc_re[x]);
            zero.store(&mut w.acc_im[x]);
        }
        for x in p * n..(p + 1) * n {
            zero.store(&mut w.acc_re[x]);
            zero.store(&mut w.acc_im[x]);
        }
        for r in 0..m {
            V::splat(b[r * n]).store(&mut w.rhs_re[r]);
            zero.store(&mut w.rhs_im[r]);
        }
    }
    let mut k = 0;
    while k < n {
        let (sw, lr, li) = pivot_step(model, k, tl, &mut failed, w);
        if k + 1 == n {
            break;
        }
        let row = &h[(k + 1) * n + k + 1..(k + 2) * n];
        if p == 1 && k + 2 < n {
            // Steps k and k + 1 in one pass over the columns (the SISO case): column
            // k + 1 for step k, the pivot of step k + 1, then both row operations per
            // column with the values held in registers. Each value sees the same
            // operations in the same order as in two separate passes.
            let (zr, zi) = (V::load(&w.z_re[0]), V::load(&w.z_im[0]));
            let (vr, vi) = (V::load(&w.z_re[1]), V::load(&w.z_im[1]));
            {
                let (cr, ci) = (V::load(&w.cur_re[k + 1]), V::load(&w.cur_im[k + 1]));
                let (xr, xi) = (V::splat(-row[0]) + sr, si);
                let (er, ei) = (V::select(sw, xr, cr), V::select(sw, xi, ci));
                let (fr, fi) = (V::select(sw, cr, xr), V::select(sw, ci, xi));
                let (ar, ai) = (V::load(&w.acc_re[k + 1]), V::load(&w.acc_im[k + 1]));
                let (nr, ni) = minus_product(ar, ai, zr, zi, er, ei);
                nr.store(&mut w.acc_re[k + 1]);
                ni.store(&mut w.acc_im[k + 1]);
                let (ar, ai) = (V::load(&w.acc_re[n + k + 1]), V::load(&w.acc_im[n + k + 1]));
                let (nr, ni) = minus_product(ar, ai, vr, vi, er, ei);
                nr.store(&mut w.acc_re[n + k + 1]);
                ni.store(&mut w.acc_im[n + k + 1]);
                let (nr, ni) = minus_product(fr, fi, lr, li, er, ei);
                nr.store(&mut w.cur_re[k + 1]);
                ni.store(&mut w.cur_im[k + 1]);
            }
            let (sw2, lr2, li2) = pivot_step(model, k + 1, tl, &mut failed, w);
            let (zr2, zi2) = (V::load(&w.z_re[0]), V::load(&w.z_im[0]));
            let (vr2, vi2) = (V::load(&w.z_re[1]), V::load(&w.z_im[1]));
            let row2 = &h[(k + 2) * n + k + 2..(k + 3) * n];
            let (acc_re, est_re) = w.acc_re.split_at_mut(n);
            let (acc_im, est_im) = w.acc_im.split_at_mut(n);
            let columns = row[1..]
                .iter()
                .zip(row2)
                .zip(w.cur_re[k + 2..n].iter_mut().zip(&mut w.cur_im[k + 2..n]))
                .zip(acc_re[k + 2..].iter_mut().zip(&mut acc_im[k + 2..]))
                .zip(est_re[k + 2..].iter_mut().zip(&mut est_im[k + 2..]));
            for (j, ((((&h1, &h2), (cre, cim)), (are, aim)), (vre, vim))) in columns.enumerate() {
                let (cr, ci) = (V::load(cre), V::load(cim));
                // Step k: row k + 1 of sI − H is real here.
                let x = V::splat(-h1);
                let (er, ei) = (V::select(sw, x, cr), V::select(sw, zero, ci));
                let (fr, fi) = (V::select(sw, cr, x), V::select(sw, ci, zero));
                let (ar, ai) = minus_product(V::load(are), V::load(aim), zr, zi, er, ei);
                let (tr, ti) = minus_product(V::load(vre), V::load(vim), vr, vi, er, ei);
                let (cr, ci) = minus_product(fr, fi, lr, li, er, ei);
                // Step k + 1: row k + 2 of sI − H, complex on its diagonal (j = 0).
                let (xr, xi) = if j == 0 {
                    (V::splat(-h2) + sr, si)
                } else {
                    (V::splat(-h2), zero)
                };
                let (er, ei) = (V::select(sw2, xr, cr), V::select(sw2, xi, ci));
                let (fr, fi) = (V::select(sw2, cr, xr), V::select(sw2, ci, xi));
                let (ar, ai) = minus_product(ar, ai, zr2, zi2, er, ei);
                ar.store(are);
                ai.store(aim);
                let (tr, ti) = minus_product(tr, ti, vr2, vi2, er, ei);
                tr.store(vre);
                ti.store(vim);
                let (cr, ci) = minus_product(fr, fi, lr2, li2, er, ei);
                cr.store(cre);
                ci.store(cim);
            }
            k += 2;
            continue;
        }
        // Output by output, then the estimator row; the rows are eliminated in that last
        // pass, after every accumulator has taken the pivot row.
        for q in 0..=p {
            let (zr, zi) = (V::load(&w.z_re[q]), V::load(&w.z_im[q]));
            let eliminate = q == p;
            let acc_re = &mut w.acc_re[q * n + k + 1..(q + 1) * n];
            let acc_im = &mut w.acc_im[q * n + k + 1..(q + 1) * n];
            let cur_re = &mut w.cur_re[k + 1..n];
            let cur_im = &mut w.cur_im[k + 1..n];
            let columns = row
                .iter()
                .zip(cur_re.iter_mut().zip(cur_im.iter_mut()))
                .zip(acc_re.iter_mut().zip(acc_im.iter_mut()));
            for (j, ((&hv, (cre, cim)), (are, aim))) in columns.enumerate() {
                let (cr, ci) = (V::load(cre), V::load(cim));
                // Row k + 1 of sI − H at column k + 1 + j: real except on the diagonal.
                let (xr, xi) = if j == 0 {
                    (V::splat(-hv) + sr, si)
                } else {
                    (V::splat(-hv), zero)
                };
                let (er, ei) = (V::select(sw, xr, cr), V::select(sw, xi, ci));
                let (nr, ni) = minus_product(V::load(are), V::load(aim), zr, zi, er, ei);
                nr.store(are);
                ni.store(aim);
                if eliminate {
                    let (fr, fi) = (V::select(sw, cr, xr), V::select(sw, ci, xi));
                    let (nr, ni) = minus_product(fr, fi, lr, li, er, ei);
                    nr.store(cre);
                    ni.store(cim);
                }
            }
        }
        k += 1;
    }
    let mut flags = [0.0; MAX_LANES];
    failed.store(&mut flags);
    flags.map(|f| f != 0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_instruction_set_gives_the_same_bits() {
        // The scalar path against the AVX2 and AVX-512 ones where the CPU has them
        // (identity: the same correctly rounded operations per lane).
        // The general path (two outputs) and the paired SISO steps (odd and even n).
        for (n, m, p) in [(9usize, 2usize, 2usize), (9, 1, 1), (8, 1, 1)] {
            let mut seed = 3u64;
            let mut next = || {
                seed = seed
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
            };
            let mut h: Vec<f64> = (0..n * n).map(|_| next()).collect();
            for i in 0..n {
                for j in 0..i.saturating_sub(1) {
                    h[i * n + j] = 0.0;
                }
            }
            let b: Vec<f64> = (0..n * m).map(|_| next()).collect();
            let c: Vec<f64> = (0..p * n).map(|_| next()).collect();
            let model = LaneModel {
                n,
                m,
                p,
                h: &h,
                b: &b,
                c: &c,
            };
            let s_im: Lane = [0.0, 0.1, 0.3, 1.0, 2.0, 5.0, 20.0, 1e3];
            let s_re: Lane = [0.0; MAX_LANES];
            let tol = [1e-14; MAX_LANES];
            let mut reference = LaneWork::new(n, m, p);
            let mut growth = [0.0; MAX_LANES];
            for l in 0..MAX_LANES {
                let one = |x: &Lane| {
                    let mut y = [0.0; MAX_LANES];
                    y[0] = x[l];
                    y
                };
                let mut w = LaneWork::new(n, m, p);
                let failed = solve::<f64>(&model, &one(&s_re), &one(&s_im), &one(&tol), &mut w);
                assert!(!failed[0]);
                growth[l] = w.growth[0];
                for (r, g) in reference.g_re.iter_mut().zip(&w.g_re) {
                    r[l] = g[0];
                }
                for (r, g) in reference.g_im.iter_mut().zip(&w.g_im) {
                    r[l] = g[0];
                }
            }
            #[cfg(target_arch = "x86_64")]
            {
                let mut w = LaneWork::new(n, m, p);
                if std::arch::is_x86_feature_detected!("avx512f") {
                    // SAFETY: the CPU supports AVX-512F (checked just above).
                    unsafe { solve_avx512(&model, &s_re, &s_im, &tol, &mut w) };
                    assert_eq!((&w.g_re, &w.g_im), (&reference.g_re, &reference.g_im));
                    assert_eq!(w.growth, growth);
                }
                if std::arch::is_x86_feature_detected!("avx2")
                    && std::arch::is_x86_feature_detected!("fma")
                {
                    let mut w = LaneWork::new(n, m, p);
                    for half in 0..2 {
                        let part = |x: &Lane| {
                            let mut y = [0.0; MAX_LANES];
                            y[..4].copy_from_slice(&x[half * 4..half * 4 + 4]);
                            y
                        };
                        // SAFETY: the CPU supports AVX2 and FMA (checked just above).
                        unsafe {
                            solve_avx2(&model, &part(&s_re), &part(&s_im), &part(&tol), &mut w)
                        };
                        for (r, g) in reference.g_re.iter().zip(&w.g_re) {
                            assert_eq!(r[half * 4..half * 4 + 4], g[..4]);
                        }
                        for (r, g) in reference.g_im.iter().zip(&w.g_im) {
                            assert_eq!(r[half * 4..half * 4 + 4], g[..4]);
                        }
                        assert_eq!(growth[half * 4..half * 4 + 4], w.growth[..4]);
                    }
                }
            }
        }
    }
}
