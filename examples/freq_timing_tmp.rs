use loopwright::freq::*;
use std::time::Instant;
fn main() {
    let a = TransferModel::constant(1e5).pole(10.0).pole(1e5).pole(1e6).pole(3e6).pole(1e7).pole(3e7).zero(2e6).zero(5e7);
    let l = FeedbackLoop::with_constant_beta(a, 0.1).unwrap();
    let n = 50;
    let t = Instant::now();
    let mut s = 0.0;
    for _ in 0..n { s += loop_gain_sweep(&l, 1.0, 1e9, 10_000).unwrap().phase_deg[5000]; }
    println!("sweep 10k: {:?} ({s})", t.elapsed() / n);
    let t = Instant::now();
    for _ in 0..n { s += stability_margins(&l).unwrap().phase_margin_deg.unwrap(); }
    println!("margins: {:?}", t.elapsed() / n);
    let t = Instant::now();
    for _ in 0..n { s += closed_loop_poles(&l).unwrap().poles[0].re; }
    println!("poles: {:?} {s}", t.elapsed() / n);
}
