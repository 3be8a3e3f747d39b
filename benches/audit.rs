//! Speed and memory of `audit` on synthetic storerooms: 10,000 containers in 200
//! cabinets (target: 10 s or less and 1 GB or less on a 2-core machine), and 100,000.
//! Prints medians over repeated runs, the work done, and the peak resident memory.

use offgas::store::audit::{AuditSettings, Auditor};
use offgas::store::generate::{synthetic_store, StoreShape};
use std::time::Instant;

fn peak_rss_mb() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

fn main() {
    let cat = offgas::embedded::catalog().unwrap();
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(&cat).unwrap();
    let auditor = Auditor {
        cat: &cat,
        th: &th,
        rules: &rules,
        settings: AuditSettings {
            spill_area_m2: th.storeroom.spill_area_m2,
            cabinet_level: true,
        },
    };
    let quick = std::env::args().any(|a| a == "--quick");
    for (containers, cabinets, runs) in [
        (10_000usize, 200usize, if quick { 1 } else { 3 }),
        (100_000, 2_000, 1),
    ] {
        if quick && containers > 10_000 {
            break;
        }
        let shape = StoreShape {
            containers,
            cabinets,
            seed: 7,
            ..Default::default()
        };
        let inv = synthetic_store(&cat, &shape);
        let mut times = Vec::new();
        let mut last = None;
        for _ in 0..runs {
            let start = Instant::now();
            let r = auditor.audit(&inv, &|_, _| {});
            times.push(start.elapsed().as_secs_f64());
            last = Some(r);
        }
        times.sort_by(f64::total_cmp);
        let r = last.unwrap();
        let c = &r.counts;
        println!(
            "audit {containers} containers / {cabinets} cabinets: median {:.2} s over {runs} runs; {} pairs can meet, {} cleared by screening, {} checked, {} distinct checks; {} findings; peak RSS {:.0} MB",
            times[times.len() / 2],
            c.pairs_that_can_meet,
            c.pairs_cleared_by_screening,
            c.pairs_checked,
            c.distinct_checks,
            r.findings.len(),
            peak_rss_mb().unwrap_or(f64::NAN)
        );
    }
}
