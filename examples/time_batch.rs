//! Times the pieces of the order-8 SISO round trip of the batch benchmark in the core alone
//! (no Python): `cargo run --release --example time_batch [models]`.
//! Prints processor microseconds per model (summed over threads) for `realize_batch`, `transfer_function_batch` (Auto) and the
//! single `transfer_function` calls (the scalar recursion), on the rayon pool and on one thread.

use statewright::batch::{realize_batch, transfer_function_batch};
use statewright::matrix::Matrix;
use statewright::realize::Form;
use statewright::recover::{transfer_function_f64, Method};
use statewright::state_space::StateSpace;
use std::time::Instant;

/// Processor time of this process so far (user + system, Linux `/proc/self/stat`, 100 ticks
/// per second), so that figures hold on a loaded machine; wall time elsewhere.
fn cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    let fields: Vec<&str> = stat.rsplit_once(')')?.1.split_whitespace().collect();
    let ticks: f64 = fields.get(11)?.parse::<f64>().ok()? + fields.get(12)?.parse::<f64>().ok()?;
    Some(ticks / 100.0)
}

/// Best of `repeat` runs: processor time where available, else wall time.
fn best_of(repeat: usize, mut f: impl FnMut()) -> f64 {
    (0..repeat)
        .map(|_| {
            let (t, c) = (Instant::now(), cpu_seconds());
            f();
            match (c, cpu_seconds()) {
                (Some(c0), Some(c1)) => c1 - c0,
                _ => t.elapsed().as_secs_f64(),
            }
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let count: usize = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(100_000);
    let n = 8;
    let mut seed = 12345u64;
    let mut next = move || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((seed >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    };
    let mut num = Vec::with_capacity(count * (n + 1));
    let mut den = Vec::with_capacity(count * (n + 1));
    for _ in 0..count {
        den.push(1.0);
        den.extend((0..n).map(|_| next()));
        num.extend((0..=n).map(|_| next()));
    }
    let form = Form::ControllableCanonical;
    let r = realize_batch(&num, n + 1, &den, n + 1, count, form).unwrap();
    let per = |t: f64| t / count as f64 * 1e6;
    let pool = rayon::current_num_threads();
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    for (label, threads) in [("pool", pool), ("one thread", 1)] {
        let run = |f: &mut (dyn FnMut() + Send)| {
            if threads == 1 {
                one.install(|| best_of(3, f))
            } else {
                best_of(3, f)
            }
        };
        let t_real = run(&mut || {
            std::hint::black_box(realize_batch(&num, n + 1, &den, n + 1, count, form).unwrap());
        });
        let t_tf = run(&mut || {
            std::hint::black_box(
                transfer_function_batch(&r.a, &r.b, &r.c, &r.d, count, n, 1, 1).unwrap(),
            );
        });
        let skip_single = std::env::var_os("TIME_BATCH_ONLY").is_some();
        let t_single = run(&mut || {
            if skip_single {
                return;
            }
            use rayon::prelude::*;
            (0..count).into_par_iter().for_each(|i| {
                let take = |x: &[f64], r: usize, c: usize| {
                    Matrix::from_row_major(r, c, x[i * r * c..(i + 1) * r * c].to_vec()).unwrap()
                };
                let ss = StateSpace {
                    a: take(&r.a, n, n),
                    b: take(&r.b, n, 1),
                    c: take(&r.c, 1, n),
                    d: take(&r.d, 1, 1),
                };
                std::hint::black_box(transfer_function_f64(&ss, Method::Auto).unwrap());
            });
        });
        println!(
            "{label} ({threads} threads): realize_batch {:.3} us/model, transfer_function_batch {:.3} \
             us/model, single transfer_function calls {:.3} us/model",
            per(t_real),
            per(t_tf),
            per(t_single)
        );
    }
}
