//! The worst case: every vertex of the box solved, the extremes of each
//! result with the vertex that gives them, and the requirements judged at
//! their worst vertex.

use super::*;

/// The extremes of one result over the parameter box.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Extreme {
    /// The result.
    pub quantity: Quantity,
    /// Its nominal value.
    pub nominal: f64,
    /// Its lowest value.
    pub min: f64,
    /// Its highest value.
    pub max: f64,
    /// The corner that gives `min`.
    pub min_corner: Corner,
    /// The corner that gives `max`.
    pub max_corner: Corner,
}

/// The worst-case analysis: the extremes of every result that exists.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct WorstCase {
    /// One entry per result, in the order of [`Quantity::ALL`]; a corner the
    /// nominal stage does not have is left out.
    pub extremes: Vec<Extreme>,
    /// Vertices solved (each with both capacitor settings when there are capacitors).
    pub vertices: usize,
    /// Vertices where the transistor is saturated or cut off. When there are
    /// any, the results are no longer monotonic over the box and the
    /// extremes are the vertex extremes only: points inside can fall outside
    /// them (module docs).
    pub inactive_vertices: usize,
    /// How the lower-corner search ended over the box: that of the nominal
    /// stage, or [`Edge::NoPassband`] when some vertex has no lower corner
    /// where the nominal stage has one (its response no longer crosses the
    /// −3 dB level there).
    pub low_edge: Edge,
    /// The same for the upper corner.
    pub high_edge: Edge,
    /// How the THD's extremes were searched, when the THD is followed (a
    /// `max_thd` requirement, [`worst_case_with`]).
    pub thd: Option<ThdSearch>,
}

/// A vertex (mask, capacitors) and the THD found there.
type Found = ((u32, i8), f64);

/// The search of the THD's extremes over the box (module docs: a steady
/// state at every vertex would cost seconds).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ThdSearch {
    /// Vertices whose steady state was solved.
    pub solved: usize,
    /// Vertices in all (each capacitor setting counted, when there are
    /// capacitors).
    pub of: usize,
    /// A vertex where the stage does not deliver the output peak or its
    /// steady state is not found, with the reason: the highest THD is then
    /// unbounded (`max` is infinite) and `max_thd` fails there.
    pub failure: Option<(Corner, alloc::string::String)>,
}

impl WorstCase {
    /// The extremes of `q`, if the stage has that result.
    pub fn get(&self, q: Quantity) -> Option<&Extreme> {
        self.extremes.iter().find(|e| e.quantity == q)
    }
}

/// Running extremes of one value with the corner codes that give them.
#[derive(Clone, Copy)]
pub(super) struct Track {
    pub(super) min: f64,
    pub(super) max: f64,
    pub(super) min_at: (u32, i8),
    pub(super) max_at: (u32, i8),
}

impl Track {
    pub(super) fn new(v: f64) -> Track {
        // The nominal point, coded as vertex u32::MAX.
        Track {
            min: v,
            max: v,
            min_at: (u32::MAX, 0),
            max_at: (u32::MAX, 0),
        }
    }
    pub(super) fn add(&mut self, v: f64, at: (u32, i8)) {
        if !v.is_finite() {
            return;
        }
        if !self.min.is_finite() || v < self.min {
            self.min = v;
            self.min_at = at;
        }
        if !self.max.is_finite() || v > self.max {
            self.max = v;
            self.max_at = at;
        }
    }
}

impl Model {
    /// The corner of vertex `mask` over the varying non-capacitor
    /// parameters `axes`, with the capacitors at `caps` (−1 min, 0 nominal, 1 max).
    pub(super) fn corner(&self, axes: &[Parameter], at: (u32, i8)) -> Corner {
        let (mask, caps) = at;
        let settings = self
            .varying()
            .map(|p| {
                let level = if mask == u32::MAX {
                    Level::Nominal
                } else if p.is_capacitor() {
                    match caps {
                        -1 => Level::Min,
                        1 => Level::Max,
                        _ => Level::Nominal,
                    }
                } else {
                    match axes.iter().position(|a| *a == p) {
                        Some(bit) if mask & (1 << bit) != 0 => Level::Max,
                        Some(_) => Level::Min,
                        None => Level::Nominal,
                    }
                };
                Setting {
                    parameter: p,
                    level,
                }
            })
            .collect();
        Corner { settings }
    }

    pub(super) fn worst_case(&self) -> Result<WorstCase> {
        let axes: Vec<Parameter> = self.varying().filter(|p| !p.is_capacitor()).collect();
        let caps: Vec<Parameter> = self.varying().filter(|p| p.is_capacitor()).collect();
        let n = 1u32 << axes.len();
        let nominal = &self.sample;
        let mut tracks: Vec<Track> = nominal.values.iter().map(|&v| Track::new(v)).collect();
        let cap_settings: &[i8] = if caps.is_empty() { &[0] } else { &[-1, 1] };
        let mut inactive_vertices = 0;
        let mut edges = self.edges;
        for mask in 0..n {
            let mut x = self.nominal;
            for (bit, p) in axes.iter().enumerate() {
                let i = p.index();
                x[i] = if mask & (1 << bit) != 0 {
                    self.high[i]
                } else {
                    self.low[i]
                };
            }
            let solved = self
                .solve(&x)
                .map_err(|e| at_corner(e, &self.corner(&axes, (mask, 0))))?;
            let mut first = true;
            for &c in cap_settings {
                for p in &caps {
                    let i = p.index();
                    x[i] = if c < 0 { self.low[i] } else { self.high[i] };
                }
                let (stage, _) = self.stage_at(&x);
                let resp = Response::new(&stage, &solved.ss)?;
                let at = (mask, c);
                if first {
                    // The capacitors do not move the DC and midband results.
                    let at_mid = (mask, 0);
                    let s = midband_sample(&solved, &resp);
                    if !s.active {
                        inactive_vertices += 1;
                    }
                    for q in Quantity::ALL {
                        if !matches!(q, Quantity::FLow | Quantity::FHigh) {
                            tracks[q.index()].add(s.get(q), at_mid);
                        }
                    }
                    first = false;
                }
                let mut s = *nominal;
                corners_into(&resp, self.lower, self.upper, PRECISE, false, &mut s)?;
                for (k, q) in [Quantity::FLow, Quantity::FHigh].into_iter().enumerate() {
                    tracks[q.index()].add(s.get(q), at);
                    if self.edges[k] == Edge::Corner && !s.get(q).is_finite() {
                        edges[k] = Edge::NoPassband;
                    }
                }
            }
        }
        let thd = if let Some(why) = &self.thd_nominal_error {
            Some(ThdSearch {
                solved: 0,
                of: 0,
                failure: Some((self.corner(&axes, (u32::MAX, 0)), why.clone())),
            })
        } else if self.thd.is_some() {
            let (search, low, high) = self.thd_search(&axes, !caps.is_empty(), &tracks);
            let t = &mut tracks[Quantity::Thd.index()];
            *t = Track::new(nominal.get(Quantity::Thd));
            t.add(low.1, low.0);
            // The highest may be unbounded (a vertex that does not deliver
            // the peak), which `add` would skip.
            if high.1 > t.max {
                t.max = high.1;
                t.max_at = high.0;
            }
            Some(search)
        } else {
            None
        };
        let extremes = Quantity::ALL
            .into_iter()
            .filter(|q| nominal.get(*q).is_finite())
            .map(|q| {
                let t = &tracks[q.index()];
                Extreme {
                    quantity: q,
                    nominal: nominal.get(q),
                    min: t.min,
                    max: t.max,
                    min_corner: self.corner(&axes, t.min_at),
                    max_corner: self.corner(&axes, t.max_at),
                }
            })
            .collect();
        Ok(WorstCase {
            extremes,
            vertices: n as usize,
            inactive_vertices,
            low_edge: edges[0],
            high_edge: edges[1],
            thd,
        })
    }

    /// The point of the vertex `at` = (mask over `axes`, capacitors −1/1,
    /// or 0 when there are none).
    pub(super) fn vertex(&self, axes: &[Parameter], at: (u32, i8)) -> [f64; PARAMETERS] {
        let mut x = self.nominal;
        for (bit, p) in axes.iter().enumerate() {
            let i = p.index();
            x[i] = if at.0 & (1 << bit) != 0 {
                self.high[i]
            } else {
                self.low[i]
            };
        }
        for p in self.varying().filter(|p| p.is_capacitor()) {
            let i = p.index();
            x[i] = if at.1 < 0 { self.low[i] } else { self.high[i] };
        }
        x
    }

    /// The THD's lowest and highest over the box, each with its vertex, by
    /// the search of the module docs: the vertices where the small-signal
    /// results that drive distortion are at their extremes (`tracks`: the
    /// swing's lowest, the gain's and IC's lowest and highest), each with
    /// the capacitors at their minimum, then single flips (one parameter,
    /// or every capacitor together) from the best of them, taken while they
    /// improve.
    fn thd_search(
        &self,
        axes: &[Parameter],
        caps: bool,
        tracks: &[Track],
    ) -> (ThdSearch, Found, Found) {
        let cap_low: i8 = if caps { -1 } else { 0 };
        let mut seen: Vec<Found> = Vec::new();
        let mut failure: Option<(Corner, alloc::string::String)> = None;
        let mut thd_at = |at: (u32, i8), seen: &mut Vec<Found>| -> f64 {
            if let Some(&(_, v)) = seen.iter().find(|(a, _)| *a == at) {
                return v;
            }
            let x = self.vertex(axes, at);
            let v = match self.solve(&x).and_then(|s| self.thd_of(&s)) {
                Ok(v) => v,
                Err(e) => {
                    if failure.is_none() {
                        failure = Some((self.corner(axes, at), alloc::format!("{e}")));
                    }
                    f64::INFINITY
                }
            };
            seen.push((at, v));
            v
        };
        let mut starts: Vec<(u32, i8)> = Vec::new();
        for (q, lowest, highest) in [
            (Quantity::Swing, true, false),
            (Quantity::VoltageGain, true, true),
            (Quantity::Ic, true, true),
        ] {
            let t = &tracks[q.index()];
            for (wanted, at) in [(lowest, t.min_at), (highest, t.max_at)] {
                if wanted && at.0 != u32::MAX && !starts.iter().any(|s| s.0 == at.0) {
                    starts.push((at.0, cap_low));
                }
            }
        }
        if starts.is_empty() {
            starts.push((0, cap_low));
        }
        let mut result = [((0u32, 0i8), 0.0); 2];
        for (k, sign) in [1.0f64, -1.0].into_iter().enumerate() {
            // sign 1: the highest (an unbounded THD is the highest there
            // is); sign −1: the lowest (an unbounded one is never it).
            let score = |v: f64| {
                if sign > 0.0 {
                    v
                } else if v.is_finite() {
                    -v
                } else {
                    f64::NEG_INFINITY
                }
            };
            let mut best = starts[0];
            let mut best_v = score(thd_at(best, &mut seen));
            for &s in &starts[1..] {
                let v = score(thd_at(s, &mut seen));
                if v > best_v {
                    best = s;
                    best_v = v;
                }
            }
            while best_v < f64::INFINITY {
                let mut step: Option<((u32, i8), f64)> = None;
                let flips = (0..axes.len())
                    .map(|b| (best.0 ^ (1 << b), best.1))
                    .chain(caps.then_some((best.0, -best.1)));
                for n in flips {
                    let v = score(thd_at(n, &mut seen));
                    if v > step.map_or(best_v, |s| s.1) {
                        step = Some((n, v));
                    }
                }
                match step {
                    Some((n, v)) => {
                        best = n;
                        best_v = v;
                    }
                    None => break,
                }
            }
            let v = seen
                .iter()
                .find(|(a, _)| *a == best)
                .map_or(f64::NAN, |e| e.1);
            result[k] = (best, v);
        }
        let of = (1usize << axes.len()) * if caps { 2 } else { 1 };
        (
            ThdSearch {
                solved: seen.len(),
                of,
                failure,
            },
            result[1],
            result[0],
        )
    }
}

pub(super) fn at_corner(e: Error, corner: &Corner) -> Error {
    let mut what = alloc::string::String::from("worst case at the corner");
    for s in &corner.settings {
        what.push(' ');
        what.push_str(s.parameter.name());
        what.push('=');
        what.push_str(s.level.name());
    }
    Error::inconsistent("tolerances", alloc::format!("{what}: {e}"))
}

/// `max_thd` (`limit`) judged at the highest THD the search found.
fn worst_thd_check(requirements: &Requirements, worst: &WorstCase, limit: f64) -> WorstCheck {
    let what = match requirements.thd_condition() {
        Some(c) => ["worst-case ", &thd_label(c)].concat(),
        None => "worst-case THD".into(),
    };
    let failed = |why: alloc::string::String, corner: Option<Corner>| WorstCheck {
        check: thd_check_of(&what, Err(Error::inconsistent("tolerances", why)), limit),
        corner,
    };
    let Some(search) = &worst.thd else {
        return failed(
            "this worst case did not follow it (worst_case_with does)".into(),
            None,
        );
    };
    match (worst.get(Quantity::Thd), &search.failure) {
        (Some(e), _) if e.max.is_finite() => WorstCheck {
            check: thd_check_of(&what, Ok(e.max), limit),
            corner: Some(e.max_corner.clone()),
        },
        (_, Some((corner, why))) => failed(
            alloc::format!("at a vertex of the tolerance box, {why}"),
            Some(corner.clone()),
        ),
        _ => failed("not found".into(), None),
    }
}

/// The worst case of `stage` over the box of `tolerances`: every vertex of
/// the resistors, hFE, VBE, ambient and supply, each with the capacitors all
/// at their minimum and all at their maximum (see the module docs).
pub fn worst_case(stage: &Stage, tolerances: &Tolerances) -> Result<WorstCase> {
    Model::new(stage, Some(tolerances), None)?.worst_case()
}

/// [`worst_case`], also following the results that `requirements` need
/// beyond the small-signal ones: with `max_thd` set, the THD at its
/// condition, whose extremes are searched (module docs).
pub fn worst_case_with(
    stage: &Stage,
    tolerances: &Tolerances,
    requirements: &Requirements,
) -> Result<WorstCase> {
    Model::new(stage, Some(tolerances), requirements.thd_condition())?.worst_case()
}

/// One requirement judged at the vertex of the tolerance box where it is
/// worst (see [`worst_checks`]).
#[derive(Debug, Clone, PartialEq)]
pub struct WorstCheck {
    /// The check, with `id` the requirement's key (`min_swing`) and the
    /// worst value as its value.
    pub check: Check,
    /// The vertex of the worst value (`None` when the stage has no such
    /// corner frequency, which counts as in the nominal check).
    pub corner: Option<Corner>,
}

/// Each requirement that is set, judged at the vertex where it is worst:
/// the lowest value over the box for a lower bound (`min_…`), the highest
/// for an upper bound (`max_…`). The meaning is that of the nominal check:
/// a corner found at every vertex is judged at its worst; a corner the
/// stage has but some vertex lacks fails ([`WorstCase::low_edge`]); no
/// corner at all (the gain holds to DC) or one beyond the search range is
/// judged as the nominal check judges it; the gain is compared in dB. The
/// command line's `check --worst-case` and the page both judge with this.
pub fn worst_checks(requirements: &Requirements, worst: &WorstCase) -> Vec<WorstCheck> {
    let mut out = Vec::new();
    for (req, limit) in requirements.limits() {
        if req.quantity == Quantity::Thd {
            out.push(worst_thd_check(requirements, worst, limit));
            continue;
        }
        let what = ["worst-case ", req.label()].concat();
        let at_least = req.bound == Bound::AtLeast;
        // A corner that is not found at every vertex: the rules of the
        // nominal check (`corner_met`), with what the box showed.
        if let Some(side) = req.side() {
            let edge = if side == Side::Lower {
                worst.low_edge
            } else {
                worst.high_edge
            };
            if edge == Edge::NoPassband {
                let bound = if at_least { "at least" } else { "at most" };
                let check = Check {
                    id: req.key.into(),
                    pass: false,
                    value: 0.0,
                    limit,
                    unit: "Hz",
                    message: alloc::format!(
                        "{what}: none at some vertex of the tolerance box, where the response does not come within 3 dB of its midband gain; the required {bound} {} is not met",
                        crate::format::format_si(limit, "Hz")
                    ),
                };
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
            if edge != Edge::Corner {
                let check = corner_check(side, &what, edge, None, limit, &Default::default());
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
        }
        let (value, corner) = match worst.get(req.quantity) {
            Some(e) if at_least => (e.min, Some(e.min_corner.clone())),
            Some(e) => (e.max, Some(e.max_corner.clone())),
            None => (f64::NAN, None),
        };
        let check = req.check(&what, req.reading(value), limit);
        out.push(WorstCheck { check, corner });
    }
    out
}
