//! Shared helpers for the integration tests: the bundled catalog and a mixture builder.
#![allow(dead_code)]

use offgas::catalog::Catalog;
use offgas::chem::{Closure, Mixture};
use std::sync::OnceLock;

pub fn catalog() -> &'static Catalog {
    static CAT: OnceLock<Catalog> = OnceLock::new();
    CAT.get_or_init(|| offgas::embedded::catalog().expect("bundled data loads"))
}

/// A mixture of `litres` of liquid with `headspace` litres of gas, from (family or ion, mol/L).
pub fn mix(
    parts: &[(&str, f64)],
    litres: f64,
    headspace: f64,
    t_c: f64,
    closure: Closure,
) -> Mixture {
    let cat = catalog();
    let mut m = Mixture::empty(t_c + 273.15, closure);
    for &(name, c) in parts {
        if let Some(f) = cat.family_by_id(name) {
            m.add_family(f, c * litres);
        } else if let Some(i) = cat.ion_by_formula(name) {
            m.add_ion(i, c * litres);
        } else {
            panic!("no family or strong ion `{name}`");
        }
    }
    m.liquid_l = litres;
    m.headspace_l = headspace;
    m
}

/// Davies log10 γ for a unit charge, written out independently of the library.
pub fn davies_log_gamma1(i: f64, t_c: f64) -> f64 {
    let eps = 87.740 - 0.40008 * t_c + 9.398e-4 * t_c * t_c - 1.410e-6 * t_c.powi(3);
    let rho: f64 = 1.0002 - 3.4e-5 * t_c - 3.3e-6 * t_c * t_c;
    let a = 1.82483e6 * rho.sqrt() / (eps * (t_c + 273.15)).powf(1.5);
    -a * (i.sqrt() / (1.0 + i.sqrt()) - 0.3 * i)
}

pub fn pka(family: &str, step: usize) -> f64 {
    let cat = catalog();
    cat.family(cat.family_by_id(family).unwrap()).steps[step].pka
}

pub fn hcp(family: &str) -> (f64, f64) {
    let cat = catalog();
    let v = cat
        .family(cat.family_by_id(family).unwrap())
        .volatile
        .clone()
        .unwrap();
    (v.hcp, v.hcp_b)
}

pub fn pkw25() -> f64 {
    let t = 298.15;
    4470.99 / t - 6.0875 + 0.01706 * t
}

pub const R: f64 = 8.314462618;

/// A check of two batch files' texts with the bundled thresholds and rules.
pub fn check_texts(
    container: &str,
    stream: &str,
    opts: &offgas::check::CheckOptions,
) -> offgas::report::CheckReport {
    let cat = catalog();
    let parse = |t: &str| {
        offgas::pour::batch::Batch::parse(cat, "t.yaml", t).unwrap_or_else(|e| panic!("{e}"))
    };
    offgas::check::check(
        cat,
        &offgas::embedded::thresholds().unwrap(),
        &offgas::embedded::rules(cat).unwrap(),
        &parse(container),
        &parse(stream),
        opts,
    )
    .unwrap()
}
