//! Speed of one speciation solve of a 12-family mixture: as it stands (about 0.5 mol/kg,
//! where the model for concentrated solutions has taken over), diluted ten times (the Davies
//! path), and in a 3 mol/kg brine; the same with four complexing metals (copper(I), silver,
//! zinc, nickel) that bind its cyanide, ammonia and citrate; and one whole `check` computation
//! in-process (mixing path both ways, pairs, findings).

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use offgas::chem::{solve, Closure, Mixture, SolverSettings};
use offgas::pour::batch::Batch;

const TWELVE: [(&str, f64); 12] = [
    ("cyanide", 0.01),
    ("sulfide", 0.005),
    ("ammonia", 0.05),
    ("carbonate", 0.02),
    ("sulfite", 0.01),
    ("fluoride", 0.01),
    ("acetate", 0.05),
    ("phosphate", 0.02),
    ("citrate", 0.01),
    ("chloride", 0.2),
    ("sulfate", 0.05),
    ("borate", 0.01),
];

/// The twelve families at `scale` times their amounts, with `brine` mol/L of NaCl.
fn twelve_family_mixture(cat: &offgas::catalog::Catalog, scale: f64, brine: f64) -> Mixture {
    let mut m = Mixture::empty(295.15, Closure::Sealed);
    for (f, c) in TWELVE {
        m.add_family(cat.family_by_id(f).expect("family"), c * scale * 10.0);
    }
    m.add_family(cat.family_by_id("chloride").unwrap(), brine * 10.0);
    m.add_ion(
        cat.ion_by_formula("Na+").unwrap(),
        (0.3 * scale + brine) * 10.0,
    );
    m.liquid_l = 10.0;
    m.water_kg = Some(10.0 * (0.997 - 0.017 * brine));
    m.headspace_l = 10.0;
    m
}

fn bench(c: &mut Criterion) {
    let cat = offgas::embedded::catalog().unwrap();
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(&cat).unwrap();
    let s = SolverSettings::default();
    for (name, scale, brine) in [
        ("solve 12-family mixture with headspace", 1.0, 0.0),
        (
            "solve 12-family mixture, diluted tenfold (Davies)",
            0.1,
            0.0,
        ),
        ("solve 12-family mixture in 3 mol/kg brine", 1.0, 3.0),
    ] {
        let m = twelve_family_mixture(&cat, scale, brine);
        c.bench_function(name, |b| b.iter(|| solve(&cat, black_box(&m), &s).unwrap()));
    }
    for (name, scale) in [
        ("solve 12-family mixture with 4 complexing metals", 1.0),
        (
            "solve 12-family mixture with 4 complexing metals, diluted tenfold (Davies)",
            0.1,
        ),
    ] {
        let mut m = twelve_family_mixture(&cat, scale, 0.0);
        for (ion, c) in [("Cu+", 0.003), ("Ag+", 0.001)] {
            m.add_ion(cat.ion_by_formula(ion).unwrap(), c * scale * 10.0);
        }
        for (family, c) in [("zinc", 0.002), ("nickel", 0.002)] {
            m.add_family(cat.family_by_id(family).unwrap(), c * scale * 10.0);
        }
        let eq = solve(&cat, &m, &s).unwrap();
        assert!(eq.complexes.len() > 8, "the metals form their complexes");
        c.bench_function(name, |b| b.iter(|| solve(&cat, black_box(&m), &s).unwrap()));
    }
    let container = Batch::parse(
        &cat,
        "carboy",
        include_str!("../data/demo/carboy-cyanide-plating.yaml"),
    )
    .unwrap();
    let stream = Batch::parse(
        &cat,
        "stream",
        include_str!("../data/demo/stream-acid-descale.yaml"),
    )
    .unwrap();
    c.bench_function("check: whole computation in-process", |b| {
        b.iter(|| {
            offgas::check::check(&cat, &th, &rules, &container, &stream, &Default::default())
                .unwrap()
        })
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
