//! The stress-state history at one point or cell, up to a stop, and its averages.
//!
//! [`extract`] is the whole job of `ductrace history`: resolve the arrays, find the tracked
//! entity (by id, nearest to coordinates, or where a field is largest at the stop), stream the
//! increments reading only that entity's tuples, compute the measures per increment, locate
//! the stop, and average. Full-field work (the `max:` selector, bands) streams one increment
//! at a time over all entities with rayon.

use ductrace_tensor::{Stress, StressState, Undefined, batch, strain};
use ductrace_vtk::{Location, Series, find_nonfinite};
use rayon::prelude::*;

use crate::average::{self, Sample, StopAt};
use crate::fields::{self, EqpsSource, FieldOptions, Fields};
use crate::locate::{Located, Reference};
use crate::spec::{GaugeSpec, Selector, Stop};
use crate::{Result, TrackError};

/// Everything `ductrace history` was asked to do.
#[derive(Debug, Clone)]
pub struct HistoryRequest {
    /// Which entity to follow.
    pub selector: Selector,
    /// The fracture instant; `None` for the last increment.
    pub stop: Option<Stop>,
    /// The gauge signal, if any.
    pub gauge: Option<GaugeSpec>,
    /// `--band K`: also summarise the K nearest entities around the chosen one.
    pub band: Option<usize>,
    /// Array choices and conventions.
    pub fields: FieldOptions,
    /// How many runners-up a `max:` selection reports.
    pub runners_up: usize,
}

impl HistoryRequest {
    /// A request with default options.
    pub fn new(selector: Selector) -> HistoryRequest {
        HistoryRequest {
            selector,
            stop: None,
            gauge: None,
            band: None,
            fields: FieldOptions::default(),
            runners_up: 5,
        }
    }
}

/// One increment of a history. Stresses in the file's unit; `None` where undefined.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Row {
    /// 0-based position in the series.
    pub increment: usize,
    /// Time of the increment.
    pub time: f64,
    /// Equivalent plastic strain ε̄p.
    pub eqps: f64,
    /// Hydrostatic stress σ_h = tr σ/3 (tension positive).
    pub sigma_h: f64,
    /// Von Mises stress σ_vm.
    pub sigma_vm: f64,
    /// Triaxiality η = σ_h/σ_vm.
    pub triaxiality: Option<f64>,
    /// Lode angle parameter θ̄.
    pub lode_angle_param: Option<f64>,
    /// Lode parameter μ.
    pub lode_param: Option<f64>,
    /// Principal stresses σ1 ≥ σ2 ≥ σ3.
    pub principal: [f64; 3],
    /// Gauge signal (length unit of the mesh), when a gauge is defined.
    pub gauge: Option<f64>,
    /// Why the shape measures are undefined, if they are.
    pub undefined: Option<Undefined>,
}

/// The summary of a history up to its stop.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Summary {
    /// ε̄p at the stop: the local fracture strain of the specimen.
    pub eqps: f64,
    /// η_avg = (1/ε_f) ∫ η dε̄p (trapezoid rule; Bao & Wierzbicki 2004).
    pub triaxiality_avg: Option<f64>,
    /// θ̄_avg = (1/ε_f) ∫ θ̄ dε̄p (trapezoid rule; Bai & Wierzbicki 2008).
    pub lode_angle_param_avg: Option<f64>,
    /// η at the stop.
    pub triaxiality: Option<f64>,
    /// θ̄ at the stop.
    pub lode_angle_param: Option<f64>,
    /// The stop as a fractional increment.
    pub stop_increment: f64,
    /// The time at the stop (interpolated).
    pub stop_time: f64,
    /// The gauge signal at the stop (interpolated), when a gauge is defined.
    pub gauge: Option<f64>,
    /// Segments with a plastic increment in the integral.
    pub increments_integrated: usize,
    /// The integration rule: always [`average::RULE`].
    pub rule: &'static str,
}

/// A ranked alternative of a `max:` selection.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Candidate {
    /// Entity id.
    pub id: usize,
    /// Reference coordinates.
    pub coords: [f64; 3],
    /// The field's value at the stop.
    pub value: f64,
}

/// How a `max:` selection was made.
#[derive(Debug, Clone, PartialEq)]
pub struct Selection {
    /// The field maximised.
    pub field: String,
    /// Its value at the chosen entity.
    pub value: f64,
    /// The fractional increment where it was evaluated.
    pub at_increment: f64,
    /// The next-largest entities, in decreasing order.
    pub runners_up: Vec<Candidate>,
}

/// The gauge as resolved on the mesh.
#[derive(Debug, Clone, PartialEq)]
pub struct GaugeInfo {
    /// The requested gauge.
    pub spec: GaugeSpec,
    /// The mesh points used, with their distances from the requested coordinates.
    pub points: Vec<Located>,
}

/// Min and max of a summary value over a band of entities; `None` when undefined somewhere.
pub type Range = Option<[f64; 2]>;

/// The spread of the summary over the chosen entity and its K nearest neighbours.
#[derive(Debug, Clone, PartialEq)]
pub struct Band {
    /// K: neighbours besides the chosen entity.
    pub k: usize,
    /// Their ids, nearest first.
    pub ids: Vec<usize>,
    /// Range of ε̄p at the stop.
    pub eqps: Range,
    /// Range of η_avg.
    pub triaxiality_avg: Range,
    /// Range of θ̄_avg.
    pub lode_angle_param_avg: Range,
    /// Range of η at the stop.
    pub triaxiality: Range,
    /// Range of θ̄ at the stop.
    pub lode_angle_param: Range,
}

/// A complete history.
#[derive(Debug, Clone)]
pub struct History {
    /// The tracked entity.
    pub point: Located,
    /// One row per increment, up to the increment at or before the stop.
    pub rows: Vec<Row>,
    /// Averages and values at the stop.
    pub summary: Summary,
    /// The arrays used.
    pub fields: Fields,
    /// The gauge, when one was given.
    pub gauge: Option<GaugeInfo>,
    /// How a `max:` selector chose the entity.
    pub selection: Option<Selection>,
    /// The band, when asked for.
    pub band: Option<Band>,
}

/// A gauge resolved to mesh points.
#[derive(Debug, Clone)]
struct ResolvedGauge {
    path: std::path::PathBuf,
    spec: GaugeSpec,
    points: Vec<Located>,
    displacement: String,
}

impl ResolvedGauge {
    fn resolve(
        series: &Series,
        reference: &Reference,
        fields: &Fields,
        spec: GaugeSpec,
    ) -> Result<ResolvedGauge> {
        let wanted: Vec<[f64; 3]> = match spec {
            GaugeSpec::Distance(a, b) => vec![a, b],
            GaugeSpec::Component(a, _) => vec![a],
        };
        let mut points = Vec::new();
        for p in wanted {
            if !reference.inside_box(&p) {
                return Err(TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "gauge point ({}, {}, {}) lies outside the mesh (bounding box {:?} to {:?})",
                        p[0], p[1], p[2], reference.lower, reference.upper
                    ),
                });
            }
            let (id, d) = reference
                .nearest_point(&p)
                .ok_or_else(|| TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: "the mesh has no points for the gauge".into(),
                })?;
            points.push(Located {
                location: Location::Point,
                id,
                coords: reference.points[id],
                distance: Some(d),
            });
        }
        if matches!(spec, GaugeSpec::Distance(..)) && points[0].id == points[1].id {
            {
                return Err(TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "both gauge ends fall on the same mesh point {}",
                        points[0].id
                    ),
                });
            }
        }
        let displacement = fields
            .displacement
            .clone()
            .ok_or_else(|| TrackError::Field {
                path: series.path().to_path_buf(),
                message: "the gauge needs a displacement array; name one with --displacement NAME"
                    .into(),
            })?;
        Ok(ResolvedGauge {
            path: series.path().to_path_buf(),
            spec,
            points,
            displacement,
        })
    }

    /// The gauge signal at one increment.
    fn signal(&self, inc: &ductrace_vtk::Increment<'_>, buf: &mut Vec<f64>) -> Result<f64> {
        let mut u = [[0.0; 3]; 2];
        for (slot, p) in u.iter_mut().zip(&self.points) {
            inc.read_tuples(&self.displacement, Location::Point, p.id..p.id + 1, buf)?;
            if buf.len() != 3 || buf.iter().any(|v| !v.is_finite()) {
                return Err(TrackError::Data {
                    path: self.path.clone(),
                    message: format!(
                        "displacement {:?} at point {} of increment {} is not a finite 3-vector",
                        self.displacement,
                        p.id,
                        inc.index()
                    ),
                });
            }
            slot.copy_from_slice(buf);
        }
        Ok(match self.spec {
            GaugeSpec::Component(_, axis) => u[0][axis.index()],
            GaugeSpec::Distance(..) => {
                let (a, b) = (self.points[0].coords, self.points[1].coords);
                let now = [
                    b[0] + u[1][0] - a[0] - u[0][0],
                    b[1] + u[1][1] - a[1] - u[0][1],
                    b[2] + u[1][2] - a[2] - u[0][2],
                ];
                let len0 = crate::locate::distance(&a, &b);
                (now[0] * now[0] + now[1] * now[1] + now[2] * now[2]).sqrt() - len0
            }
        })
    }

    fn info(&self) -> GaugeInfo {
        GaugeInfo {
            spec: self.spec,
            points: self.points.clone(),
        }
    }
}

fn data_error(series: &Series, message: String) -> TrackError {
    TrackError::Data {
        path: series.path().to_path_buf(),
        message,
    }
}

/// The raw history of one entity: rows over the increments read and the stop within them.
struct Tracked {
    rows: Vec<Row>,
    stop: StopAt,
}

/// Reads the rows of one entity until the stop is found (or the series ends).
fn track(
    series: &Series,
    fields: &Fields,
    id: usize,
    gauge: Option<&ResolvedGauge>,
    stop: Option<Stop>,
) -> Result<Tracked> {
    let n = series.increments().len();
    if n == 0 {
        return Err(data_error(series, "the series has no increments".into()));
    }
    let loc = fields.location;
    let what = |k: usize| format!("{loc} {id} at increment {k}");
    // Tensor errors carry no file name: put the increment's file in front.
    let file_of = |k: usize| {
        series.increment_files(k).first().map_or_else(
            || series.path().display().to_string(),
            |f| f.display().to_string(),
        )
    };
    // Increments to read at most, known in advance for index and time stops.
    let known = match stop {
        None => Some(StopAt {
            index: n - 1,
            fraction: 0.0,
        }),
        Some(Stop::Increment(i)) => {
            if i >= n {
                return Err(TrackError::StopOutside {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "stop increment:{i} is outside the series: increments 0 to {}",
                        n - 1
                    ),
                });
            }
            Some(StopAt {
                index: i,
                fraction: 0.0,
            })
        }
        Some(Stop::Time(t)) => {
            let times: Vec<f64> = series.increments().iter().map(|i| i.time).collect();
            Some(
                average::first_crossing(&times, t).ok_or_else(|| TrackError::StopOutside {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "stop time:{t} is outside the series: times {} to {}",
                        times[0],
                        times[n - 1]
                    ),
                })?,
            )
        }
        Some(Stop::Eqps(_)) | Some(Stop::Gauge(_)) => None,
    };
    if matches!(stop, Some(Stop::Gauge(_))) && gauge.is_none() {
        return Err(TrackError::Field {
            path: series.path().to_path_buf(),
            message: "a gauge stop needs a gauge definition (--gauge)".into(),
        });
    }
    let last_to_read = match known {
        Some(s) if s.fraction > 0.0 => s.index + 1,
        Some(s) => s.index,
        None => n - 1,
    };

    let mut rows: Vec<Row> = Vec::with_capacity(last_to_read + 1);
    let mut buf = Vec::new();
    let mut gbuf = Vec::new();
    let mut prev_plastic: Option<[f64; 6]> = None;
    let mut found: Option<StopAt> = known;
    for k in 0..=last_to_read {
        let info = &series.increments()[k];
        let inc = series.increment(k)?;
        inc.read_tuples(&fields.stress, loc, id..id + 1, &mut buf)?;
        let stress =
            Stress::from_slice(&buf, &fields.stress_order).map_err(|e| TrackError::Tensor {
                what: format!("{}: stress {:?} at {}", file_of(k), fields.stress, what(k)),
                source: Box::new(e),
            })?;
        let state = stress.state();
        let eqps = match &fields.eqps {
            Some(EqpsSource::Scalar(name)) => {
                inc.read_tuples(name, loc, id..id + 1, &mut buf)?;
                let v = buf.first().copied().unwrap_or(f64::NAN);
                if !v.is_finite() {
                    return Err(data_error(
                        series,
                        format!("equivalent plastic strain {name:?} at {} is {v}", what(k)),
                    ));
                }
                v
            }
            Some(EqpsSource::Accumulated {
                name, order, shear, ..
            }) => {
                inc.read_tuples(name, loc, id..id + 1, &mut buf)?;
                let t = strain::strain_to_vtk6(&buf, order).map_err(|e| TrackError::Tensor {
                    what: format!("{}: plastic strain {name:?} at {}", file_of(k), what(k)),
                    source: Box::new(e),
                })?;
                let prev = prev_plastic.unwrap_or([0.0; 6]);
                let d = [
                    t[0] - prev[0],
                    t[1] - prev[1],
                    t[2] - prev[2],
                    t[3] - prev[3],
                    t[4] - prev[4],
                    t[5] - prev[5],
                ];
                prev_plastic = Some(t);
                rows.last().map_or(0.0, |r| r.eqps) + strain::equivalent_increment(&d, *shear)
            }
            None => {
                return Err(TrackError::Field {
                    path: series.path().to_path_buf(),
                    message: "no equivalent plastic strain (--eqps or --plastic-strain)".into(),
                });
            }
        };
        if let Some(prev) = rows
            .last()
            .filter(|p| eqps < p.eqps - 1e-9 * p.eqps.abs() - 1e-15)
        {
            {
                return Err(data_error(
                    series,
                    format!(
                        "equivalent plastic strain decreases at {loc} {id}: {} at increment {} then {eqps} at increment {k}",
                        prev.eqps,
                        k - 1
                    ),
                ));
            }
        }
        let g = match gauge {
            Some(g) => Some(g.signal(&inc, &mut gbuf)?),
            None => None,
        };
        rows.push(row(k, info.time, eqps, &state, stress.principal(), g));
        // Early stop for eqps and gauge stops: the first crossing so far.
        if found.is_none() {
            let target = match stop {
                Some(Stop::Eqps(e)) => Some((e, rows.iter().map(|r| r.eqps).collect::<Vec<_>>())),
                Some(Stop::Gauge(u)) => {
                    Some((u, rows.iter().map(|r| r.gauge.unwrap_or(0.0)).collect()))
                }
                _ => None,
            };
            if let Some((t, signal)) = target
                && let Some(c) = average::first_crossing(&signal, t)
            {
                found = Some(c);
                break;
            }
        }
    }
    let stop_at = match found {
        Some(s) => s,
        None => {
            let (name, first, last) = match stop {
                Some(Stop::Eqps(_)) => (
                    "equivalent plastic strain",
                    rows[0].eqps,
                    rows[rows.len() - 1].eqps,
                ),
                _ => (
                    "gauge signal",
                    rows[0].gauge.unwrap_or(0.0),
                    rows[rows.len() - 1].gauge.unwrap_or(0.0),
                ),
            };
            return Err(TrackError::StopOutside {
                path: series.path().to_path_buf(),
                message: format!(
                    "stop {} is never reached at {loc} {id}: the {name} goes from {first} to {last} over increments 0 to {}",
                    stop.map(|s| s.to_string()).unwrap_or_default(),
                    n - 1
                ),
            });
        }
    };
    Ok(Tracked {
        rows,
        stop: stop_at,
    })
}

fn row(
    increment: usize,
    time: f64,
    eqps: f64,
    state: &StressState,
    principal: [f64; 3],
    gauge: Option<f64>,
) -> Row {
    Row {
        increment,
        time,
        eqps,
        sigma_h: state.sigma_h,
        sigma_vm: state.sigma_vm,
        triaxiality: state.triaxiality(),
        lode_angle_param: state.lode_angle_param(),
        lode_param: state.lode_param(),
        principal,
        gauge,
        undefined: state.undefined(),
    }
}

fn samples(rows: &[Row]) -> Vec<Sample> {
    rows.iter()
        .map(|r| Sample {
            eqps: r.eqps,
            triaxiality: r.triaxiality,
            lode_angle_param: r.lode_angle_param,
            zero_stress: r.undefined == Some(Undefined::ZeroStress),
        })
        .collect()
}

fn lerp(a: f64, b: f64, f: f64) -> f64 {
    a + f * (b - a)
}

/// Summarises tracked rows; returns the rows cut at the stop.
fn summarise(
    series: &Series,
    fields: &Fields,
    id: usize,
    t: Tracked,
) -> Result<(Vec<Row>, Summary)> {
    let Tracked { mut rows, stop } = t;
    let s = samples(&rows);
    let a = average::average(&s, stop)
        .map_err(|e| data_error(series, format!("{} {id}: {e}", fields.location)))?;
    let (t0, g0) = (rows[stop.index].time, rows[stop.index].gauge);
    let (stop_time, gauge) = match rows.get(stop.index + 1) {
        Some(next) if stop.fraction > 0.0 => (
            lerp(t0, next.time, stop.fraction),
            match (g0, next.gauge) {
                (Some(a), Some(b)) => Some(lerp(a, b, stop.fraction)),
                _ => None,
            },
        ),
        _ => (t0, g0),
    };
    rows.truncate(stop.index + 1);
    Ok((
        rows,
        Summary {
            eqps: a.eqps,
            triaxiality_avg: a.triaxiality_avg,
            lode_angle_param_avg: a.lode_angle_param_avg,
            triaxiality: a.triaxiality,
            lode_angle_param: a.lode_angle_param,
            stop_increment: stop.position(),
            stop_time,
            gauge,
            increments_integrated: a.increments_integrated,
            rule: average::RULE,
        },
    ))
}

/// The stop of the whole series for full-field selection: known from the catalogue for
/// increment and time stops, from the gauge signal for gauge stops, and the last increment
/// for eqps stops (which depend on the entity).
fn global_stop(
    series: &Series,
    stop: Option<Stop>,
    gauge: Option<&ResolvedGauge>,
) -> Result<StopAt> {
    let n = series.increments().len();
    let last = StopAt {
        index: n.saturating_sub(1),
        fraction: 0.0,
    };
    match stop {
        None | Some(Stop::Eqps(_)) => Ok(last),
        Some(Stop::Increment(i)) if i < n => Ok(StopAt {
            index: i,
            fraction: 0.0,
        }),
        Some(Stop::Increment(i)) => Err(TrackError::StopOutside {
            path: series.path().to_path_buf(),
            message: format!(
                "stop increment:{i} is outside the series: increments 0 to {}",
                n.saturating_sub(1)
            ),
        }),
        Some(Stop::Time(t)) => {
            let times: Vec<f64> = series.increments().iter().map(|i| i.time).collect();
            average::first_crossing(&times, t).ok_or_else(|| TrackError::StopOutside {
                path: series.path().to_path_buf(),
                message: format!(
                    "stop time:{t} is outside the series: times {} to {}",
                    times.first().copied().unwrap_or(0.0),
                    times.last().copied().unwrap_or(0.0)
                ),
            })
        }
        Some(Stop::Gauge(u)) => {
            let g = gauge.ok_or_else(|| TrackError::Field {
                path: series.path().to_path_buf(),
                message: "a gauge stop needs a gauge definition (--gauge)".into(),
            })?;
            let mut signal = Vec::with_capacity(n);
            let mut buf = Vec::new();
            for k in 0..n {
                let inc = series.increment(k)?;
                signal.push(g.signal(&inc, &mut buf)?);
                if let Some(c) = average::first_crossing(&signal, u) {
                    return Ok(c);
                }
            }
            Err(TrackError::StopOutside {
                path: series.path().to_path_buf(),
                message: format!(
                    "stop gauge:{u} is never reached: the gauge signal goes from {} to {} over increments 0 to {}",
                    signal.first().copied().unwrap_or(0.0),
                    signal.last().copied().unwrap_or(0.0),
                    n.saturating_sub(1)
                ),
            })
        }
    }
}

/// Values of a field over all entities at one increment: `None` where undefined (η with
/// σ_vm = 0) or skipped (non-finite values under `allow_nonfinite`).
struct FieldScan<'a> {
    series: &'a Series,
    fields: &'a Fields,
    options: &'a FieldOptions,
    kind: ScanKind,
    buf: Vec<f64>,
    states: Vec<StressState>,
    /// Accumulated eqps and the previous plastic strain, for tensors.
    acc: Vec<f64>,
    prev: Vec<f64>,
    acc_done: usize,
}

#[derive(Debug, Clone, PartialEq)]
enum ScanKind {
    Eqps,
    Triaxiality,
    SigmaVm,
    Scalar(String, Location),
}

impl<'a> FieldScan<'a> {
    fn new(
        series: &'a Series,
        fields: &'a Fields,
        options: &'a FieldOptions,
        name: &str,
    ) -> Result<Self> {
        let kind = match name {
            "eqps" => ScanKind::Eqps,
            "triaxiality" => ScanKind::Triaxiality,
            "sigma_vm" => ScanKind::SigmaVm,
            other => {
                let f = series
                    .field(other, Some(fields.location))
                    .ok()
                    .or_else(|| series.field(other, None).ok())
                    .ok_or_else(|| TrackError::Field {
                        path: series.path().to_path_buf(),
                        message: format!(
                            "max:{other}: no such array; use eqps, triaxiality, sigma_vm or a scalar array ({})",
                            fields::list_arrays(series.fields())
                        ),
                    })?;
                if f.components != 1 {
                    return Err(TrackError::Field {
                        path: series.path().to_path_buf(),
                        message: format!(
                            "max:{other}: the array has {} components; a scalar is needed",
                            f.components
                        ),
                    });
                }
                ScanKind::Scalar(f.name.clone(), f.location)
            }
        };
        Ok(FieldScan {
            series,
            fields,
            options,
            kind,
            buf: Vec::new(),
            states: Vec::new(),
            acc: Vec::new(),
            prev: Vec::new(),
            acc_done: 0,
        })
    }

    fn location(&self) -> Location {
        match &self.kind {
            ScanKind::Scalar(_, l) => *l,
            _ => self.fields.location,
        }
    }

    fn check_finite(&self, name: &str, k: usize, components: usize) -> Result<bool> {
        if let Some(nf) = find_nonfinite(&self.buf, components) {
            if !self.options.allow_nonfinite {
                return Err(data_error(
                    self.series,
                    format!(
                        "array {name:?} at increment {k} has {} non-finite values (first at {} {}, component {}); --allow-nonfinite skips them",
                        nf.count,
                        self.location(),
                        nf.first_tuple,
                        nf.first_component
                    ),
                ));
            }
            return Ok(true);
        }
        Ok(false)
    }

    /// The field's values at increment `k`.
    fn values(&mut self, k: usize) -> Result<Vec<Option<f64>>> {
        let loc = self.location();
        match self.kind.clone() {
            ScanKind::Scalar(name, l) => {
                let inc = self.series.increment(k)?;
                inc.read(&name, l, &mut self.buf)?;
                self.check_finite(&name, k, 1)?;
                Ok(self
                    .buf
                    .par_iter()
                    .map(|v| v.is_finite().then_some(*v))
                    .collect())
            }
            ScanKind::Triaxiality | ScanKind::SigmaVm => {
                let inc = self.series.increment(k)?;
                let name = self.fields.stress.clone();
                inc.read(&name, loc, &mut self.buf)?;
                let width = self.fields.stress_components;
                let skip = self.check_finite(&name, k, width)?;
                let n = self.buf.len() / width;
                if skip {
                    // Evaluate one by one, skipping the non-finite tuples.
                    let order = self.fields.stress_order;
                    let tri = matches!(self.kind, ScanKind::Triaxiality);
                    return Ok(self
                        .buf
                        .par_chunks_exact(width)
                        .map(|t| {
                            batch::state_of(t, &order).ok().and_then(|s| {
                                if tri {
                                    s.triaxiality()
                                } else {
                                    Some(s.sigma_vm)
                                }
                            })
                        })
                        .collect());
                }
                self.states.resize(n, StressState::from_vtk6(&[0.0; 6]));
                batch::states(
                    &self.buf,
                    width,
                    &self.fields.stress_order,
                    &mut self.states,
                )
                .map_err(|e| TrackError::Tensor {
                    what: format!("stress {name:?} at increment {k}"),
                    source: Box::new(e),
                })?;
                let tri = matches!(self.kind, ScanKind::Triaxiality);
                Ok(self
                    .states
                    .par_iter()
                    .map(|s| {
                        if tri {
                            s.triaxiality()
                        } else {
                            Some(s.sigma_vm)
                        }
                    })
                    .collect())
            }
            ScanKind::Eqps => match self.fields.eqps.clone() {
                Some(EqpsSource::Scalar(name)) => {
                    let inc = self.series.increment(k)?;
                    inc.read(&name, loc, &mut self.buf)?;
                    self.check_finite(&name, k, 1)?;
                    Ok(self
                        .buf
                        .par_iter()
                        .map(|v| v.is_finite().then_some(*v))
                        .collect())
                }
                Some(EqpsSource::Accumulated {
                    name,
                    components,
                    order,
                    shear,
                }) => {
                    // Accumulate over all entities from where we left off up to k.
                    if k + 1 < self.acc_done {
                        self.acc.clear();
                        self.prev.clear();
                        self.acc_done = 0;
                    }
                    while self.acc_done <= k {
                        let j = self.acc_done;
                        let inc = self.series.increment(j)?;
                        inc.read(&name, loc, &mut self.buf)?;
                        self.check_finite(&name, j, components)?;
                        let n = self.buf.len() / components;
                        if self.acc.is_empty() {
                            self.acc = vec![0.0; n];
                            self.prev = vec![0.0; n * 6];
                        }
                        let buf = &self.buf;
                        self.acc
                            .par_iter_mut()
                            .zip(self.prev.par_chunks_exact_mut(6))
                            .zip(buf.par_chunks_exact(components))
                            .for_each(|((acc, prev), t)| {
                                if let Ok(t6) = strain::strain_to_vtk6(t, &order) {
                                    let d = [
                                        t6[0] - prev[0],
                                        t6[1] - prev[1],
                                        t6[2] - prev[2],
                                        t6[3] - prev[3],
                                        t6[4] - prev[4],
                                        t6[5] - prev[5],
                                    ];
                                    *acc += strain::equivalent_increment(&d, shear);
                                    prev.copy_from_slice(&t6);
                                } else {
                                    *acc = f64::INFINITY;
                                }
                            });
                        self.acc_done += 1;
                    }
                    Ok(self
                        .acc
                        .iter()
                        .map(|v| v.is_finite().then_some(*v))
                        .collect())
                }
                None => Err(TrackError::Field {
                    path: self.series.path().to_path_buf(),
                    message:
                        "max:eqps needs an equivalent plastic strain (--eqps or --plastic-strain)"
                            .into(),
                }),
            },
        }
    }

    /// Values at a fractional stop, interpolated linearly between the two increments.
    fn values_at(&mut self, stop: StopAt) -> Result<Vec<Option<f64>>> {
        let a = self.values(stop.index)?;
        if stop.fraction == 0.0 {
            return Ok(a);
        }
        let b = self.values(stop.index + 1)?;
        let f = stop.fraction;
        Ok(a.par_iter()
            .zip(b.par_iter())
            .map(|(x, y)| match (x, y) {
                (Some(x), Some(y)) => Some(lerp(*x, *y, f)),
                _ => None,
            })
            .collect())
    }
}

/// The largest value and its runners-up; ties to the lowest id.
fn rank(values: &[Option<f64>], count: usize) -> Vec<(usize, f64)> {
    let mut all: Vec<(usize, f64)> = values
        .iter()
        .enumerate()
        .filter_map(|(i, v)| v.map(|v| (i, v)))
        .collect();
    let order = |a: &(usize, f64), b: &(usize, f64)| b.1.total_cmp(&a.1).then(a.0.cmp(&b.0));
    let k = count.min(all.len());
    if k == 0 {
        return Vec::new();
    }
    if k < all.len() {
        all.select_nth_unstable_by(k - 1, order);
        all.truncate(k);
    }
    all.sort_by(order);
    all
}

/// Extracts the history asked for (see the module doc).
pub fn extract(series: &Series, req: &HistoryRequest) -> Result<History> {
    let need_disp = req.gauge.is_some();
    let fields = fields::resolve(series, &req.fields, true, need_disp)?;
    let reference = Reference::build(series, &fields, req.fields.deformed_points)?;
    let gauge = match req.gauge {
        Some(spec) => Some(ResolvedGauge::resolve(series, &reference, &fields, spec)?),
        None => None,
    };
    let loc = fields.location;
    let count = reference.entities.len();
    let out_of_range = |what: Location, id: usize, n: usize| TrackError::Selection {
        path: series.path().to_path_buf(),
        message: format!(
            "{what} id {id} is out of range: the mesh has {n} {what}s (ids 0 to {})",
            n.saturating_sub(1)
        ),
    };
    let mut selection = None;
    let point = match &req.selector {
        Selector::Cell(id) | Selector::Point(id) => {
            let wanted = if matches!(req.selector, Selector::Cell(_)) {
                Location::Cell
            } else {
                Location::Point
            };
            if wanted != loc {
                return Err(TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "{} selects {wanted} data but the stress {:?} is {loc} data; use {loc}:ID or choose the location",
                        req.selector, fields.stress
                    ),
                });
            }
            if *id >= count {
                return Err(out_of_range(loc, *id, count));
            }
            Located {
                location: loc,
                id: *id,
                coords: reference.entities[*id],
                distance: None,
            }
        }
        Selector::Near(p) => {
            if !reference.inside_box(p) {
                return Err(TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "near:{},{},{} lies outside the mesh (bounding box {:?} to {:?})",
                        p[0], p[1], p[2], reference.lower, reference.upper
                    ),
                });
            }
            let (id, d) = reference
                .nearest_entity(p)
                .ok_or_else(|| out_of_range(loc, 0, 0))?;
            Located {
                location: loc,
                id,
                coords: reference.entities[id],
                distance: Some(d),
            }
        }
        Selector::Max(name) => {
            let stop = global_stop(series, req.stop, gauge.as_ref())?;
            let mut scan = FieldScan::new(series, &fields, &req.fields, name)?;
            let scan_loc = scan.location();
            if scan_loc != loc {
                return Err(TrackError::Selection {
                    path: series.path().to_path_buf(),
                    message: format!(
                        "max:{name} is {scan_loc} data but the stress is {loc} data; choose the location"
                    ),
                });
            }
            let values = scan.values_at(stop)?;
            let ranked = rank(&values, req.runners_up + 1);
            let (id, value) = *ranked.first().ok_or_else(|| {
                data_error(
                    series,
                    format!("max:{name}: the field is undefined everywhere"),
                )
            })?;
            selection = Some(Selection {
                field: name.clone(),
                value,
                at_increment: stop.position(),
                runners_up: ranked[1..]
                    .iter()
                    .map(|&(id, value)| Candidate {
                        id,
                        coords: reference.entities[id],
                        value,
                    })
                    .collect(),
            });
            Located {
                location: loc,
                id,
                coords: reference.entities[id],
                distance: None,
            }
        }
    };
    let tracked = track(series, &fields, point.id, gauge.as_ref(), req.stop)?;
    let (rows, summary) = summarise(series, &fields, point.id, tracked)?;
    let band = match req.band {
        Some(k) => Some(band(
            series,
            &fields,
            &reference,
            point.id,
            k,
            gauge.as_ref(),
            req.stop,
            &summary,
        )?),
        None => None,
    };
    Ok(History {
        point,
        rows,
        summary,
        gauge: gauge.as_ref().map(ResolvedGauge::info),
        selection,
        band,
        fields,
    })
}

#[allow(clippy::too_many_arguments)]
fn band(
    series: &Series,
    fields: &Fields,
    reference: &Reference,
    id: usize,
    k: usize,
    gauge: Option<&ResolvedGauge>,
    stop: Option<Stop>,
    own: &Summary,
) -> Result<Band> {
    let ids = reference.neighbours(id, k);
    let summaries: Vec<Summary> = ids
        .par_iter()
        .map(|&n| {
            let t = track(series, fields, n, gauge, stop)?;
            Ok(summarise(series, fields, n, t)?.1)
        })
        .collect::<Result<Vec<_>>>()?;
    let all: Vec<&Summary> = std::iter::once(own).chain(summaries.iter()).collect();
    let range = |get: &dyn Fn(&Summary) -> Option<f64>| -> Range {
        let mut lo = f64::INFINITY;
        let mut hi = f64::NEG_INFINITY;
        for s in &all {
            let v = get(s)?;
            lo = lo.min(v);
            hi = hi.max(v);
        }
        Some([lo, hi])
    };
    Ok(Band {
        k,
        ids,
        eqps: range(&|s| Some(s.eqps)),
        triaxiality_avg: range(&|s| s.triaxiality_avg),
        lode_angle_param_avg: range(&|s| s.lode_angle_param_avg),
        triaxiality: range(&|s| s.triaxiality),
        lode_angle_param: range(&|s| s.lode_angle_param),
    })
}
