//! The charts of one pour: each reported gas along both orders of pouring, and the pH and
//! temperature along them. Drawn from the report's own path data.

use super::chart::{Axis, Callout, Chart, Dash, Level, Marker, Series, COLOURS};
use crate::report::{CheckReport, OrderReport};

/// At most this many gas charts; the gases come in the report's order.
const MAX_GAS_CHARTS: usize = 4;

fn orders(r: &CheckReport) -> Vec<(&OrderReport, &'static str, &'static str)> {
    let mut v = vec![(&r.poured_as_written, "as-written", "stream into container")];
    if let Some(o) = &r.poured_other_way {
        v.push((o, "other-way", "container into stream"));
    }
    v
}

fn series_for(
    o: &OrderReport,
    id: &str,
    label: &str,
    index: usize,
    y: impl Fn(&crate::report::PathPointReport) -> Option<f64>,
) -> Series {
    Series {
        id: id.into(),
        label: label.into(),
        points: o
            .path
            .iter()
            .filter_map(|p| y(p).map(|v| (p.fraction_added, v)))
            .collect(),
        dash: if index == 0 {
            Dash::Solid
        } else {
            Dash::Dashed
        },
        marker: if index == 0 {
            Marker::Circle
        } else {
            Marker::Square
        },
        colour: COLOURS[index % COLOURS.len()],
    }
}

/// One chart per reported gas (ppm on a log scale, review and stop levels drawn), each
/// order a line, the worst point of each order ringed and labelled.
pub fn gas_charts(r: &CheckReport) -> Vec<Chart> {
    let os = orders(r);
    r.poured_as_written
        .gas_peaks
        .iter()
        .take(MAX_GAS_CHARTS)
        .map(|peak| {
            let f = peak.formula.as_str();
            let series: Vec<Series> = os
                .iter()
                .enumerate()
                .map(|(i, (o, id, label))| {
                    series_for(o, id, label, i, |p| {
                        p.gases
                            .iter()
                            .find(|g| g.formula == f)
                            .map(|g| g.headspace_ppm)
                    })
                })
                .collect();
            let mut levels = Vec::new();
            if let Some(ratio) = peak.limit_ratio.filter(|v| *v > 0.0) {
                levels.push(Level {
                    y: peak.headspace_ppm / ratio,
                    label: "review level".into(),
                });
            }
            if let Some(ratio) = peak.idlh_ratio.filter(|v| *v > 0.0) {
                levels.push(Level {
                    y: peak.headspace_ppm / ratio,
                    label: "stop level".into(),
                });
            }
            let values = series
                .iter()
                .flat_map(|s| s.points.iter().map(|p| p.1))
                .chain(levels.iter().map(|l| l.y))
                .filter(|v| *v > 0.0 && v.is_finite());
            let hi = values.clone().fold(0.0f64, f64::max);
            // Six decades under the highest value are enough to see the course.
            let lo = values.fold(f64::INFINITY, f64::min).max(hi * 1e-6);
            let callouts = worst_callouts(&os, f);
            Chart {
                title: format!("{f} in the headspace along the pour"),
                width: 760.0,
                height: 340.0,
                x: Axis::share("share poured in"),
                y: Axis::log(&format!("{f}, ppm (log scale)"), lo * 0.5, hi * 2.0),
                series,
                levels,
                callouts,
            }
        })
        .collect()
}

/// Each order's worst point on the chart of gas `f`, ringed and labelled.
fn worst_callouts(os: &[(&OrderReport, &'static str, &'static str)], f: &str) -> Vec<Callout> {
    os.iter()
        .enumerate()
        .filter_map(|(i, (o, id, _))| {
            let x = o.worst_state.fraction_added;
            let y = o
                .path
                .iter()
                .find(|p| p.fraction_added == x)
                .and_then(|p| {
                    p.gases
                        .iter()
                        .find(|g| g.formula == f)
                        .map(|g| g.headspace_ppm)
                })?;
            Some(Callout {
                kind: format!("worst {id}"),
                x,
                y,
                label: format!(
                    "{} worst: {} ppm at {:.0} %",
                    if i == 0 {
                        "as written,"
                    } else {
                        "other order,"
                    },
                    super::chart::short_number(y),
                    x * 100.0
                ),
            })
        })
        .collect()
}

/// pH and temperature along both orders.
pub fn state_charts(r: &CheckReport) -> Vec<Chart> {
    let os = orders(r);
    let make = |title: &str, axis: &str, y: &dyn Fn(&crate::report::PathPointReport) -> f64| {
        let series: Vec<Series> = os
            .iter()
            .enumerate()
            .map(|(i, (o, id, label))| series_for(o, id, label, i, |p| Some(y(p))))
            .collect();
        let vals = series.iter().flat_map(|s| s.points.iter().map(|p| p.1));
        let lo = vals.clone().fold(f64::INFINITY, f64::min);
        let hi = vals.fold(f64::NEG_INFINITY, f64::max);
        let pad = ((hi - lo) * 0.1).max(0.5);
        Chart {
            title: title.into(),
            width: 760.0,
            height: 260.0,
            x: Axis::share("share poured in"),
            y: Axis::linear(axis, (lo - pad).floor(), (hi + pad).ceil()),
            series,
            levels: vec![],
            callouts: vec![],
        }
    };
    vec![
        make("pH along the pour", "pH", &|p| p.ph),
        make("Temperature along the pour", "°C", &|p| p.temperature_c),
    ]
}
