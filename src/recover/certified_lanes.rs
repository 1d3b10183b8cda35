//! The certified double-double recursion of [`super::certified`] for several models at once,
//! one model per SIMD lane: for every lane `t`, the results and bounds equal
//! `certified_double_double(a_t, n, false, Some(model_t))` bit for bit.
//!
//! # Purpose
//! The transfer-function batch runs the same branch-free recursion, of one shape, on every
//! model. Here [`LANES`] models of a batch share each arithmetic instruction: every matrix
//! entry is an array of `LANES` float64 values (structure of arrays), and each operation is
//! the scalar double-double operation applied lane by lane, which LLVM turns into vector
//! instructions on stable Rust.
//!
//! # Method
//! Exactly the operations of [`super::certified::certified_recursion`], in the same order for
//! every result entry, on every lane:
//! * where the scalar recursion skips a product whose float64 factor is zero (an entry of
//!   `A`, `B`, `C`, or of a bound matrix), the lane keeps its old value by a select (a
//!   blend), so a lane whose factor is zero is left as the scalar recursion leaves it; a
//!   product whose factor is zero in *every* lane (the fixed zeros of a companion form) is
//!   not computed at all, by a list of the entries nonzero in some lane made once per
//!   group of models;
//! * the first product of a matrix row whose entry is 1 in every lane (the ones of a
//!   companion matrix) is `0 + 1 · y`, which equals `y` (zeros made +0) bit for bit when y
//!   is finite, normalised and below 2⁹⁹⁶: then it is copied, otherwise computed (the
//!   proof is at `copies_exactly`);
//! * the double-double operations are written lane-wide, operation for operation as in
//!   [`super::double_double::Dd`], and the product error comes from the same variant (fused
//!   multiply-add where the CPU has it, Dekker's splitting otherwise) as the scalar path
//!   picks on the same CPU, so equal bits do not depend on which of the two runs;
//! * no floating-point operation is reassociated or fused beyond the scalar code's own.
//!
//! # Numerical aspects
//! The same as the scalar recursion (first-order running componentwise bound, Higham 2002,
//! ch. 3); the acceptance test ([`super::certified_accuracy`]) is shared, so a batch accepts
//! exactly the models a single call accepts. Non-finite lanes do not disturb their
//! neighbours: the only branches on values choose between evaluations with the same bits.
//! The sign and payload of a NaN are unspecified (IEEE 754, and Rust) and may differ from
//! the scalar path's; a NaN arises only in lanes that overflow, which both reject. One
//! [`LaneWork`] per thread holds every buffer; nothing is allocated per group once the
//! shape is known. Speed (order 8, one core, processor time): about 1.6 to 2 µs per model
//! against 5 to 7 µs for the scalar recursion (`cargo run --release --example time_batch`).
//!
//! # References
//! N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM 2002;
//! T. J. Dekker, Numer. Math. 18 (1971) (two-product by splitting).

use super::certified::Working;
use super::double_double::Dd;

/// Models per lane group: eight float64 lanes, two 256-bit AVX2 registers per value (two
/// independent instruction streams; measured faster here than one AVX-512 register, which
/// lowers the clock).
pub const LANES: usize = 8;

type V = [f64; LANES];
const ZERO: V = [0.0; LANES];

/// Buffers of the lane recursion, reused from one group of models to the next.
#[derive(Default)]
pub struct LaneWork {
    shape: (usize, usize, usize),
    /// Inputs of the group, entry-major: `a[e][t]` is entry e of model t's A.
    a: Vec<V>,
    abs_a: Vec<V>,
    b: Vec<V>,
    abs_b: Vec<V>,
    c: Vec<V>,
    abs_c: Vec<V>,
    d: Vec<V>,
    /// Entries of A (by row), B (by column), C (by row) nonzero in at least one lane.
    a_rows: Pattern,
    b_columns: Pattern,
    c_rows: Pattern,
    cur_hi: Vec<V>,
    cur_lo: Vec<V>,
    prod_hi: Vec<V>,
    prod_lo: Vec<V>,
    err: Vec<V>,
    grown: Vec<V>,
    propagated: Vec<V>,
    grown2: Vec<V>,
    nb_hi: Vec<V>,
    nb_lo: Vec<V>,
    cnb_hi: Vec<V>,
    cnb_lo: Vec<V>,
    gb: Vec<V>,
    cgb: Vec<V>,
    /// Results `[1, c_1, ..., c_n]` and numerator (p, m, n+1), with bounds, lane-interleaved.
    coeffs: Vec<V>,
    coeff_bounds: Vec<V>,
    numerator: Vec<V>,
    numerator_bounds: Vec<V>,
    /// One lane's results, gathered for the acceptance test.
    lane_coeffs: Vec<f64>,
    lane_coeff_bounds: Vec<f64>,
    lane_numerator: Vec<f64>,
    lane_numerator_bounds: Vec<f64>,
}

/// One lane's results, borrowed from the workspace.
pub struct LaneResult<'w> {
    /// `[1, c_1, ..., c_n]` and its bounds.
    pub coeffs: &'w [f64],
    pub coeff_bounds: &'w [f64],
    /// Numerator (p, m, n+1) row-major and its bounds.
    pub numerator: &'w [f64],
    pub numerator_bounds: &'w [f64],
}

fn resize(v: &mut Vec<V>, len: usize) {
    v.clear();
    v.resize(len, ZERO);
}

/// Entry-major copy of up to LANES row-major matrices of `len` entries each (`data` holds
/// them one after another); missing lanes are zero.
fn load(dst: &mut [V], data: &[f64], len: usize, models: usize) {
    dst.iter_mut().for_each(|v| *v = ZERO);
    for t in 0..models {
        for (e, x) in data[t * len..(t + 1) * len].iter().enumerate() {
            dst[e][t] = *x;
        }
    }
}

/// For each row (or column) of a matrix, the entries along it that are nonzero in some
/// lane, in increasing order: `index[start[o]..start[o + 1]]`.
/// `full` marks the entries nonzero in every lane (no lane to leave alone: no blend),
/// `unit` those equal to 1 in every lane (the ones of a companion matrix).
#[derive(Default)]
struct Pattern {
    start: Vec<usize>,
    index: Vec<usize>,
    full: Vec<bool>,
    unit: Vec<bool>,
}

impl Pattern {
    /// `at(o, i)` is the position of entry i along line o.
    fn build(&mut self, x: &[V], lines: usize, along: usize, at: impl Fn(usize, usize) -> usize) {
        self.start.clear();
        self.index.clear();
        self.full.clear();
        self.unit.clear();
        self.start.push(0);
        for o in 0..lines {
            for i in 0..along {
                let entry = &x[at(o, i)];
                if entry.iter().any(|v| *v != 0.0) {
                    self.index.push(i);
                    self.full.push(entry.iter().all(|v| *v != 0.0));
                    self.unit.push(entry.iter().all(|v| *v == 1.0));
                }
            }
            self.start.push(self.index.len());
        }
    }

    /// Entries along line o and whether each is nonzero in every lane.
    #[inline(always)]
    fn line(&self, o: usize) -> impl Iterator<Item = (usize, bool)> + Clone + '_ {
        let range = self.start[o]..self.start[o + 1];
        self.index[range.clone()]
            .iter()
            .copied()
            .zip(self.full[range].iter().copied())
    }

    /// Whether line o starts with an entry equal to 1 in every lane.
    #[inline(always)]
    fn starts_with_unit(&self, o: usize) -> bool {
        self.start[o] < self.start[o + 1] && self.unit[self.start[o]]
    }
}

/// One float64 operation on every lane (LLVM makes one vector instruction of it).
#[inline(always)]
fn each(x: V, y: V, f: impl Fn(f64, f64) -> f64) -> V {
    let mut r = ZERO;
    for t in 0..LANES {
        r[t] = f(x[t], y[t]);
    }
    r
}

#[inline(always)]
fn add(x: V, y: V) -> V {
    each(x, y, |a, b| a + b)
}

#[inline(always)]
fn sub(x: V, y: V) -> V {
    each(x, y, |a, b| a - b)
}

#[inline(always)]
fn mul(x: V, y: V) -> V {
    each(x, y, |a, b| a * b)
}

#[inline(always)]
fn abs(x: V) -> V {
    each(x, x, |a, _| a.abs())
}

/// `x` where `keep` is zero, else `y`, lane by lane.
#[inline(always)]
fn keep_where_zero(keep: V, x: V, y: V) -> V {
    let mut r = ZERO;
    for t in 0..LANES {
        // A bitwise blend (vectorizes as one; a plain `if` becomes masked stores).
        let mask = 0u64.wrapping_sub((keep[t] == 0.0) as u64);
        r[t] = f64::from_bits((x[t].to_bits() & mask) | (y[t].to_bits() & !mask));
    }
    r
}

/// [`super::double_double::two_sum`] on every lane.
#[inline(always)]
fn two_sum(a: V, b: V) -> (V, V) {
    let s = add(a, b);
    let bb = sub(s, a);
    (s, add(sub(a, sub(s, bb)), sub(b, bb)))
}

/// [`super::double_double::fast_two_sum`] on every lane.
#[inline(always)]
fn fast_two_sum(a: V, b: V) -> (V, V) {
    let s = add(a, b);
    (s, sub(b, sub(s, a)))
}

/// [`super::double_double::split`] on every lane.
#[inline(always)]
fn split(a: V) -> (V, V) {
    let c = mul([134_217_729.0; LANES], a);
    let hi = sub(c, sub(c, a));
    (hi, sub(a, hi))
}

/// [`super::double_double::two_prod`] on every lane.
#[inline(always)]
fn two_prod<const FMA: bool>(a: V, b: V) -> (V, V) {
    let p = mul(a, b);
    if FMA {
        let mut e = ZERO;
        for t in 0..LANES {
            e[t] = a[t].mul_add(b[t], -p[t]);
        }
        (p, e)
    } else {
        let (ah, al) = split(a);
        let (bh, bl) = split(b);
        let e = add(
            add(add(sub(mul(ah, bh), p), mul(ah, bl)), mul(al, bh)),
            mul(al, bl),
        );
        (p, e)
    }
}

/// `o += x · y` lane by lane, [`Dd::add_mul_f64`] on every lane (double-double `o`, `y`;
/// float64 `x`), leaving a lane alone where its `x` is zero, as the scalar recursion skips
/// that product (no blend when `full`: x is nonzero in every lane).
#[inline(always)]
fn add_mul_dd<const FMA: bool>(oh: &mut V, ol: &mut V, x: &V, yh: &V, yl: &V, full: bool) {
    let (hi, lo) = dd_add_mul::<FMA>(*oh, *ol, *x, *yh, *yl);
    if full {
        (*oh, *ol) = (hi, lo);
    } else {
        *oh = keep_where_zero(*x, *oh, hi);
        *ol = keep_where_zero(*x, *ol, lo);
    }
}

/// `o += x · y` lane by lane in float64 (not fused), a lane left alone where its `x` is zero.
#[inline(always)]
fn add_mul_f64(o: &mut V, x: &V, y: &V) {
    *o = keep_where_zero(*x, *o, add(*o, mul(*x, *y)));
}

#[inline(always)]
fn div(x: V, y: V) -> V {
    each(x, y, |a, b| a / b)
}

#[inline(always)]
fn neg(x: V) -> V {
    each(x, x, |a, _| -a)
}

/// [`Dd::add`] on every lane.
#[inline(always)]
fn dd_add(xh: V, xl: V, yh: V, yl: V) -> (V, V) {
    let (s, e) = two_sum(xh, yh);
    fast_two_sum(s, add(e, add(xl, yl)))
}

/// [`Dd::add_mul_f64`] on every lane (no lane skipped): `x + a · y`.
#[inline(always)]
fn dd_add_mul<const FMA: bool>(xh: V, xl: V, a: V, yh: V, yl: V) -> (V, V) {
    let (p, e) = two_prod::<FMA>(a, yh);
    let (s, e2) = two_sum(xh, p);
    fast_two_sum(s, add(e2, add(add(e, mul(a, yl)), xl)))
}

/// [`Dd::div_small`] on every lane.
#[inline(always)]
fn dd_div_small<const FMA: bool>(xh: V, xl: V, k: V) -> (V, V) {
    let q1 = div(xh, k);
    let (p, e) = two_prod::<FMA>(q1, k);
    let r = add(sub(sub(xh, p), e), xl);
    fast_two_sum(q1, div(r, k))
}

impl LaneWork {
    /// Loads up to [`LANES`] models of shape (n, m, p) — `a` holds their A matrices one after
    /// another (n·n each), `b` (n·m), `c` (p·n), `d` (p·m) — and runs the recursion on
    /// them; lanes beyond `models` hold zeros and are computed but meaningless.
    #[allow(clippy::too_many_arguments)]
    pub fn run(
        &mut self,
        a: &[f64],
        b: &[f64],
        c: &[f64],
        d: &[f64],
        models: usize,
        (n, m, p): (usize, usize, usize),
    ) {
        debug_assert!(models <= LANES);
        if self.shape != (n, m, p) || self.coeffs.len() != n + 1 {
            self.allocate(n, m, p);
        }
        load(&mut self.a, a, n * n, models);
        load(&mut self.b, b, n * m, models);
        load(&mut self.c, c, p * n, models);
        load(&mut self.d, d, p * m, models);
        for (dst, src) in [
            (&mut self.abs_a, &self.a),
            (&mut self.abs_b, &self.b),
            (&mut self.abs_c, &self.c),
        ] {
            for (x, y) in dst.iter_mut().zip(src) {
                *x = y.map(f64::abs);
            }
        }
        self.a_rows.build(&self.a, n, n, |i, l| i * n + l);
        self.b_columns.build(&self.b, m, n, |j, l| l * m + j);
        self.c_rows.build(&self.c, p, n, |i, l| i * n + l);
        self.dispatch(n, m, p);
    }

    /// The recursion on the loaded lanes, with the product error of the variant the scalar
    /// path picks on this CPU ([`super::certified::certified_double_double`]).
    fn dispatch(&mut self, n: usize, m: usize, p: usize) {
        #[cfg(target_arch = "x86_64")]
        {
            if std::arch::is_x86_feature_detected!("fma") {
                if std::arch::is_x86_feature_detected!("avx2") {
                    // SAFETY: the CPU supports AVX2 and FMA (checked just above).
                    return unsafe { self.recursion_avx2_fma(n, m, p) };
                }
                // SAFETY: the CPU supports FMA (checked just above).
                return unsafe { self.recursion_fma(n, m, p) };
            }
        }
        self.recursion::<false>(n, m, p);
    }

    /// Lane `t`'s results of the last [`LaneWork::run`].
    pub fn lane(&mut self, t: usize) -> LaneResult<'_> {
        let gather = |dst: &mut Vec<f64>, src: &[V]| {
            dst.clear();
            dst.extend(src.iter().map(|v| v[t]));
        };
        gather(&mut self.lane_coeffs, &self.coeffs);
        gather(&mut self.lane_coeff_bounds, &self.coeff_bounds);
        gather(&mut self.lane_numerator, &self.numerator);
        gather(&mut self.lane_numerator_bounds, &self.numerator_bounds);
        LaneResult {
            coeffs: &self.lane_coeffs,
            coeff_bounds: &self.lane_coeff_bounds,
            numerator: &self.lane_numerator,
            numerator_bounds: &self.lane_numerator_bounds,
        }
    }

    fn allocate(&mut self, n: usize, m: usize, p: usize) {
        self.shape = (n, m, p);
        let pm = p * m;
        for (v, len) in [
            (&mut self.a, n * n),
            (&mut self.abs_a, n * n),
            (&mut self.b, n * m),
            (&mut self.abs_b, n * m),
            (&mut self.c, p * n),
            (&mut self.abs_c, p * n),
            (&mut self.d, pm),
            (&mut self.cur_hi, n * n),
            (&mut self.cur_lo, n * n),
            (&mut self.prod_hi, n * n),
            (&mut self.prod_lo, n * n),
            (&mut self.err, n * n),
            (&mut self.grown, n * n),
            (&mut self.propagated, n * n),
            (&mut self.grown2, if pm > 0 { n * n } else { 0 }),
            (&mut self.nb_hi, n * m),
            (&mut self.nb_lo, n * m),
            (&mut self.cnb_hi, pm),
            (&mut self.cnb_lo, pm),
            (&mut self.gb, n * m),
            (&mut self.cgb, pm),
            (&mut self.coeffs, n + 1),
            (&mut self.coeff_bounds, n + 1),
            (&mut self.numerator, pm * (n + 1)),
            (&mut self.numerator_bounds, pm * (n + 1)),
        ] {
            resize(v, len);
        }
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx2,fma")]
    unsafe fn recursion_avx2_fma(&mut self, n: usize, m: usize, p: usize) {
        self.recursion::<true>(n, m, p);
    }

    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "fma")]
    unsafe fn recursion_fma(&mut self, n: usize, m: usize, p: usize) {
        self.recursion::<true>(n, m, p);
    }

    /// The recursion of `certified_recursion::<Dd<FMA>>` (no adjugates kept) on every lane.
    #[inline(always)]
    fn recursion<const FMA: bool>(&mut self, n: usize, m: usize, p: usize) {
        let u = <Dd<FMA> as Working>::UNIT;
        let gamma = |j: usize| {
            let ju = j as f64 * u;
            ju / (1.0 - ju)
        };
        let (gn, g2n) = ([gamma(n); LANES], [gamma(2 * n); LANES]);
        let (uv, two_u) = ([u; LANES], [2.0 * u; LANES]);
        let pm = p * m;
        let w = self;
        w.coeffs[0] = [1.0; LANES];
        w.coeff_bounds[0] = ZERO;
        for i in 0..pm {
            w.numerator[i * (n + 1)] = w.d[i];
            w.numerator_bounds[i * (n + 1)] = ZERO;
        }
        for i in 0..n {
            for j in 0..n {
                w.cur_hi[i * n + j] = [if i == j { 1.0 } else { 0.0 }; LANES];
            }
        }
        w.cur_lo.iter_mut().for_each(|v| *v = ZERO);
        w.err.iter_mut().for_each(|v| *v = ZERO);

        for k in 1..=n {
            let kv = [k as f64; LANES];
            // product = A · N_{k−1}
            sparse_dd::<FMA>(
                &w.a,
                n,
                &w.a_rows,
                &w.cur_hi,
                &w.cur_lo,
                n,
                &mut w.prod_hi,
                &mut w.prod_lo,
            );
            grow(&mut w.grown, &w.err, gn, &w.cur_hi);
            // propagated = |A| · grown
            sparse_f64(&w.abs_a, n, &w.a_rows, &w.grown, n, &mut w.propagated);

            let (mut th, mut tl, mut trace_abs, mut trace_err) = (ZERO, ZERO, ZERO, ZERO);
            for i in 0..n {
                let e = i * n + i;
                (th, tl) = dd_add(th, tl, w.prod_hi[e], w.prod_lo[e]);
                trace_abs = add(trace_abs, abs(w.prod_hi[e]));
                trace_err = add(trace_err, w.propagated[e]);
            }
            let (ckh, ckl) = dd_div_small::<FMA>(neg(th), neg(tl), kv);
            let ck_err = add(
                div(add(trace_err, mul(gn, trace_abs)), kv),
                mul(uv, abs(ckh)),
            );

            if pm > 0 {
                // Numerator term for s^(n−k): C N_{k−1} B + c_k D.
                grow(&mut w.grown2, &w.err, g2n, &w.cur_hi);
                by_columns_dd::<FMA>(
                    &w.cur_hi,
                    &w.cur_lo,
                    n,
                    &w.b,
                    m,
                    &w.b_columns,
                    &mut w.nb_hi,
                    &mut w.nb_lo,
                );
                sparse_dd::<FMA>(
                    &w.c,
                    n,
                    &w.c_rows,
                    &w.nb_hi,
                    &w.nb_lo,
                    m,
                    &mut w.cnb_hi,
                    &mut w.cnb_lo,
                );
                dense_f64(&w.grown2, n, &w.abs_b, m, &mut w.gb);
                sparse_f64(&w.abs_c, n, &w.c_rows, &w.gb, m, &mut w.cgb);
                for i in 0..pm {
                    let slot = i * (n + 1) + k;
                    let (ch, cl, di) = (w.cnb_hi[i], w.cnb_lo[i], w.d[i]);
                    let (vh, vl) = dd_add_mul::<FMA>(ch, cl, di, ckh, ckl);
                    w.numerator[slot] = add(vh, vl);
                    let rounding = mul(two_u, add(abs(ch), mul(abs(ckh), abs(di))));
                    w.numerator_bounds[slot] = add(add(w.cgb[i], mul(ck_err, abs(di))), rounding);
                }
            }

            w.coeffs[k] = add(ckh, ckl);
            w.coeff_bounds[k] = ck_err;
            if k < n {
                for i in 0..n {
                    let e = i * n + i;
                    (w.prod_hi[e], w.prod_lo[e]) = dd_add(w.prod_hi[e], w.prod_lo[e], ckh, ckl);
                    w.propagated[e] = add(w.propagated[e], ck_err);
                }
                grow(&mut w.err, &w.propagated, uv, &w.prod_hi);
                std::mem::swap(&mut w.cur_hi, &mut w.prod_hi);
                std::mem::swap(&mut w.cur_lo, &mut w.prod_lo);
            }
        }
    }
}

/// `out = base + g · |hi|` entry by entry.
#[inline(always)]
fn grow(out: &mut [V], base: &[V], g: V, hi: &[V]) {
    for ((o, b), h) in out.iter_mut().zip(base).zip(hi) {
        *o = add(*b, mul(g, abs(*h)));
    }
}

/// `out = x · y` in double-double (x float64 with `x_cols` columns, its nonzero pattern by
/// rows; y `y_cols` columns): every entry summed over the row's pattern in increasing
/// order, as the scalar `mul_left`, lanes with a zero factor left alone.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
fn sparse_dd<const FMA: bool>(
    x: &[V],
    x_cols: usize,
    rows: &Pattern,
    yh: &[V],
    yl: &[V],
    y_cols: usize,
    oh: &mut [V],
    ol: &mut [V],
) {
    for i in 0..rows.start.len() - 1 {
        let row = rows.line(i);
        let unit_first = rows.starts_with_unit(i);
        for j in 0..y_cols {
            let (mut h, mut lo) = (ZERO, ZERO);
            for (k, (l, full)) in row.clone().enumerate() {
                let e = l * y_cols + j;
                if k == 0 && unit_first && copies_exactly(&yh[e], &yl[e]) {
                    (h, lo) = (add(yh[e], ZERO), add(yl[e], ZERO));
                    continue;
                }
                add_mul_dd::<FMA>(&mut h, &mut lo, &x[i * x_cols + l], &yh[e], &yl[e], full);
            }
            oh[i * y_cols + j] = h;
            ol[i * y_cols + j] = lo;
        }
    }
}

/// Whether `0 + 1 · y`, the first product of a row whose entry is 1 in every lane, equals
/// `(y_hi + 0, y_lo + 0)` bit for bit on every lane, so it need not be computed.
///
/// It does when y is finite, normalised (`fl(y_hi + y_lo) = y_hi`) and below 2⁹⁹⁶ (where
/// Dekker's splitting cannot overflow). Then in [`Dd::add_mul_f64`]: the product is
/// `y_hi` exactly and its error +0 (an exact zero sum is +0 in round-to-nearest; with
/// splitting, `(1·b_h − y_hi) + b_l` cancels exactly); `two_sum(+0, y_hi)` gives
/// `s = y_hi + 0` and error +0; the low sum is `y_lo + 0`; and `fast_two_sum` returns
/// `(s, y_lo + 0)` since `fl(s + y_lo) = s` (for y_hi = ±0 normalisation forces y_lo = ±0,
/// and every zero comes out +0 — which is what adding +0 does). Otherwise (an overflowing or
/// unnormalised lane: never seen in practice, but possible) the product is computed.
#[inline(always)]
fn copies_exactly(yh: &V, yl: &V) -> bool {
    const LIMIT: f64 = 6.696928794914171e299; // 2^996
    let mut ok = true;
    for t in 0..LANES {
        ok &= (yh[t] + yl[t] == yh[t]) & (yh[t].abs() < LIMIT);
    }
    ok
}

/// [`sparse_dd`] in float64 (the bound matrices).
#[inline(always)]
fn sparse_f64(x: &[V], x_cols: usize, rows: &Pattern, y: &[V], y_cols: usize, o: &mut [V]) {
    for i in 0..rows.start.len() - 1 {
        let row = rows.line(i);
        for j in 0..y_cols {
            let mut acc = ZERO;
            for (l, full) in row.clone() {
                let (xv, yv) = (&x[i * x_cols + l], &y[l * y_cols + j]);
                if full {
                    acc = add(acc, mul(*xv, *yv));
                } else {
                    add_mul_f64(&mut acc, xv, yv);
                }
            }
            o[i * y_cols + j] = acc;
        }
    }
}

/// `out = x · y` in float64 for a dense x (n×n) and y (n×m), lanes with a zero x left alone.
#[inline(always)]
fn dense_f64(x: &[V], n: usize, y: &[V], m: usize, o: &mut [V]) {
    for i in 0..n {
        for j in 0..m {
            let mut acc = ZERO;
            for l in 0..n {
                add_mul_f64(&mut acc, &x[i * n + l], &y[l * m + j]);
            }
            o[i * m + j] = acc;
        }
    }
}

/// `out = N · B` in double-double (N n×n, B n×m float64 with its pattern by columns), as
/// the scalar `mul_right`: lanes whose entry of B is zero left alone.
#[allow(clippy::too_many_arguments)]
#[inline(always)]
fn by_columns_dd<const FMA: bool>(
    xh: &[V],
    xl: &[V],
    n: usize,
    b: &[V],
    m: usize,
    columns: &Pattern,
    oh: &mut [V],
    ol: &mut [V],
) {
    for i in 0..n {
        for j in 0..m {
            let (mut h, mut lo) = (ZERO, ZERO);
            for (l, full) in columns.line(j) {
                let e = i * n + l;
                add_mul_dd::<FMA>(&mut h, &mut lo, &b[l * m + j], &xh[e], &xl[e], full);
            }
            oh[i * m + j] = h;
            ol[i * m + j] = lo;
        }
    }
}

#[cfg(test)]
mod tests {
    //! Reference: the scalar recursion [`super::super::certified`] on each model alone (the
    //! lanes must reproduce it bit for bit, bounds included).
    use super::*;
    use crate::matrix::Matrix;
    use crate::recover::certified::{certified_double_double, certified_recursion};
    use crate::state_space::StateSpace;

    struct Rng(u64);
    impl Rng {
        fn next(&mut self) -> f64 {
            self.0 = self
                .0
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((self.0 >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
        }
        /// Entries with exact zeros and ones sprinkled in (zero in some lanes, not in others),
        /// scaled over a few decades, and now and then a huge one (overflow in the recursion).
        fn entry(&mut self, huge: bool) -> f64 {
            let r = self.next();
            if r < -0.7 {
                0.0
            } else if r < -0.6 {
                1.0
            } else if huge && r > 0.97 {
                1e200 * self.next()
            } else {
                self.next() * 10f64.powf(3.0 * self.next())
            }
        }
    }

    fn model(rng: &mut Rng, (n, m, p): (usize, usize, usize), kind: usize) -> StateSpace<f64> {
        let mut fill = |r: usize, c: usize, huge: bool| {
            Matrix::from_row_major(r, c, (0..r * c).map(|_| rng.entry(huge)).collect()).unwrap()
        };
        let mut ss = StateSpace {
            a: fill(n, n, kind >= 2),
            b: fill(n, m, false),
            c: fill(p, n, false),
            d: fill(p, m, false),
        };
        if (kind == 1 || kind == 3) && n > 0 {
            // A companion matrix (the realize_batch output): ones above the diagonal.
            let last: Vec<f64> = (0..n).map(|j| ss.a.as_slice()[(n - 1) * n + j]).collect();
            let mut a = vec![0.0; n * n];
            for i in 0..n - 1 {
                a[i * n + i + 1] = 1.0;
            }
            a[(n - 1) * n..].copy_from_slice(&last);
            ss.a = Matrix::from_row_major(n, n, a).unwrap();
        }
        ss
    }

    /// The bits of every value, NaNs as one pattern: the sign and payload of a NaN produced
    /// by an operation are unspecified (IEEE 754 §6.2.3, and Rust's float semantics), and
    /// scalar and vector instructions may pick different operands' NaNs. A NaN appears only
    /// in overflowing lanes, which the acceptance test rejects either way.
    fn bits(x: &[f64]) -> Vec<u64> {
        x.iter()
            .map(|v| {
                if v.is_nan() {
                    f64::NAN.to_bits()
                } else {
                    v.to_bits()
                }
            })
            .collect()
    }

    fn stack(
        models: &[StateSpace<f64>],
        part: impl Fn(&StateSpace<f64>) -> &Matrix<f64>,
    ) -> Vec<f64> {
        models
            .iter()
            .flat_map(|s| part(s).as_slice().to_vec())
            .collect()
    }

    /// Runs the lanes on `models` (at most LANES) and checks every lane against `reference`.
    fn check(
        models: &[StateSpace<f64>],
        shape: (usize, usize, usize),
        dekker: bool,
        reference: impl Fn(&StateSpace<f64>) -> crate::recover::certified::CertifiedSequence,
    ) {
        let mut work = LaneWork::default();
        let (a, b, c, d) = (
            stack(models, |s| &s.a),
            stack(models, |s| &s.b),
            stack(models, |s| &s.c),
            stack(models, |s| &s.d),
        );
        if dekker {
            work.run(&a, &b, &c, &d, models.len(), shape);
            let (n, m, p) = shape;
            work.recursion::<false>(n, m, p);
        } else {
            work.run(&a, &b, &c, &d, models.len(), shape);
        }
        for (t, ss) in models.iter().enumerate() {
            let want = reference(ss);
            let got = work.lane(t);
            assert_eq!(
                bits(got.coeffs),
                bits(&want.coeffs),
                "lane {t} coefficients"
            );
            assert_eq!(
                bits(got.coeff_bounds),
                bits(&want.coeff_bounds),
                "lane {t} bounds"
            );
            assert_eq!(
                bits(got.numerator),
                bits(&want.numerator),
                "lane {t} numerator"
            );
            assert_eq!(
                bits(got.numerator_bounds),
                bits(&want.numerator_bounds),
                "lane {t} numerator bounds"
            );
        }
    }

    const SHAPES: [(usize, usize, usize); 7] = [
        (8, 1, 1),
        (0, 1, 1),
        (1, 1, 1),
        (3, 2, 2),
        (5, 1, 3),
        (12, 2, 1),
        (4, 0, 2),
    ];

    #[test]
    fn lanes_equal_the_scalar_recursion_bit_for_bit() {
        let mut rng = Rng(7);
        for shape in SHAPES {
            for kind in 0..4 {
                // Full groups and ragged ones (fewer models than lanes).
                for count in [LANES, 1, LANES - 1, 2] {
                    let models: Vec<_> = (0..count).map(|_| model(&mut rng, shape, kind)).collect();
                    check(&models, shape, false, |ss| {
                        certified_double_double(ss.a.as_slice(), shape.0, false, Some(ss))
                    });
                }
            }
        }
    }

    #[test]
    fn dekker_lanes_equal_the_dekker_scalar_recursion_bit_for_bit() {
        let mut rng = Rng(11);
        for shape in SHAPES {
            for kind in 0..4 {
                let models: Vec<_> = (0..LANES - 1)
                    .map(|_| model(&mut rng, shape, kind))
                    .collect();
                check(&models, shape, true, |ss| {
                    certified_recursion::<Dd<false>>(ss.a.as_slice(), shape.0, false, Some(ss))
                });
            }
        }
    }

    #[test]
    fn a_workspace_reused_across_shapes_gives_the_same_bits() {
        let mut rng = Rng(3);
        let mut work = LaneWork::default();
        for shape in [(6, 1, 1), (3, 2, 1), (6, 1, 1)] {
            let models: Vec<_> = (0..LANES).map(|_| model(&mut rng, shape, 1)).collect();
            let (a, b, c, d) = (
                stack(&models, |s| &s.a),
                stack(&models, |s| &s.b),
                stack(&models, |s| &s.c),
                stack(&models, |s| &s.d),
            );
            work.run(&a, &b, &c, &d, LANES, shape);
            for (t, ss) in models.iter().enumerate() {
                let want = certified_double_double(ss.a.as_slice(), shape.0, false, Some(ss));
                assert_eq!(bits(work.lane(t).numerator), bits(&want.numerator));
                assert_eq!(bits(work.lane(t).coeffs), bits(&want.coeffs));
            }
        }
    }
}
