//! Times the float transfer-function recovery of order-8 companion models in the core alone
//! (no Python): `cargo run --release --example time_recovery`.

use statewright::realize::{realize_f64, Form};
use statewright::recover::{certified, transfer_function_f64, Method};
use std::time::Instant;

fn main() {
    let mut seed = 12345u64;
    let mut next = move || {
        seed = seed.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        ((seed >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    };
    let models: Vec<_> = (0..20000)
        .map(|_| {
            let mut den = vec![1.0];
            den.extend((0..8).map(|_| next()));
            let num: Vec<f64> = (0..9).map(|_| next()).collect();
            realize_f64(&num, &den, Form::ControllableCanonical).unwrap().0
        })
        .collect();
    for method in [Method::Recursion, Method::Auto] {
        let t = Instant::now();
        let mut sink = 0.0;
        for ss in &models {
            sink += transfer_function_f64(ss, method).unwrap().1[3];
        }
        println!("{method:?}: {:.2} us/model ({sink:.3})", t.elapsed().as_secs_f64() / models.len() as f64 * 1e6);
    }
    let t = Instant::now();
    let mut sink = 0.0;
    for ss in &models {
        sink += certified::certified_double_double(ss.a.as_slice(), 8, false, Some(ss)).coeffs[2];
    }
    println!("dd recursion alone: {:.2} us/model ({sink:.3})", t.elapsed().as_secs_f64() / models.len() as f64 * 1e6);
}
