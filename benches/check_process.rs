//! Wall time of a whole `offgas check` process (start, load data, mixing path both ways,
//! print JSON), run many times; prints the median and quartiles. Target: 50 ms or less.

use std::process::Command;
use std::time::Instant;

fn main() {
    let exe = env!("CARGO_BIN_EXE_offgas");
    let root = env!("CARGO_MANIFEST_DIR");
    let runs = 60;
    let mut times = Vec::with_capacity(runs);
    for _ in 0..runs {
        let start = Instant::now();
        let out = Command::new(exe)
            .args([
                "check",
                &format!("{root}/data/demo/carboy-cyanide-plating.yaml"),
                "--add",
                &format!("{root}/data/demo/stream-acid-descale.yaml"),
                "--format",
                "json",
            ])
            .output()
            .expect("runs offgas");
        times.push(start.elapsed().as_secs_f64() * 1e3);
        assert!(
            matches!(out.status.code(), Some(0 | 3 | 4)),
            "offgas failed: {out:?}"
        );
    }
    times.sort_by(f64::total_cmp);
    let q = |p: f64| times[((runs - 1) as f64 * p).round() as usize];
    println!(
        "offgas check process, {runs} runs: median {:.1} ms (quartiles {:.1}–{:.1} ms, min {:.1} ms)",
        q(0.5),
        q(0.25),
        q(0.75),
        times[0]
    );
}
