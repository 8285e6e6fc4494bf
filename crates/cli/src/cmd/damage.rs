//! `ductrace damage`: damage accumulation with a fitted locus.
//!
//! * On a study: per specimen, D along the critical point's history (linear rule, Johnson &
//!   Cook 1985; or the power-law rule with `--exponent M`, Xue 2007), where D reaches 1,
//!   and the gauge elongation there against the measured one.
//! * On a result: D for every point or cell at every increment, streamed one increment at
//!   a time (rayon), the first entity to reach 1 and when, and the largest D.

use ductrace_campaign::Study;
use ductrace_locus::{
    CellDamage, DamageRule, FractureLocus, IncrementFields, Locus, accumulate, start_cells,
    update_cells,
};
use ductrace_track::fields::EqpsSource;
use ductrace_track::{HistoryRequest, Selector};
use ductrace_vtk::{Increment, Location, Series};
use rayon::prelude::*;
use serde_json::{Value, json};

use crate::args::DamageArgs;
use crate::cmd::fit::path_to_stop;
use crate::cmd::history::coords;
use crate::cmd::table::Campaign;
use crate::failure::Failure;
use crate::fieldpass::{FieldState, Lode};
use crate::locusfile;
use crate::output::{self, Format};

/// The damage check of one specimen.
#[derive(Debug, Clone)]
pub struct SpecimenDamage {
    /// Specimen name.
    pub specimen: String,
    /// D at the test's fracture instant (end of the path up to the stop).
    pub damage_end: f64,
    /// Fractional increment where D reaches 1 along the whole history, if it does.
    pub increment_at_failure: Option<f64>,
    /// Gauge signal there.
    pub gauge_at_failure: Option<f64>,
    /// The measured fracture gauge value (the study's gauge stop).
    pub gauge_measured: Option<f64>,
    /// gauge_at_failure − gauge_measured (mesh length unit).
    pub difference: Option<f64>,
    /// The difference in % of the measured value.
    pub difference_percent: Option<f64>,
    /// (gauge, D) along the whole history, for plots.
    pub curve: Vec<(f64, f64)>,
    /// D at the last increment of the series.
    pub damage_series_end: f64,
}

fn lerp(a: f64, b: f64, f: f64) -> f64 {
    a + f * (b - a)
}

/// The damage check of a study: one entry per specimen (errors per specimen).
pub fn check_study(
    campaign: &Campaign,
    locus: &Locus,
    rule: DamageRule,
) -> Vec<(String, Result<SpecimenDamage, String>)> {
    let study = &campaign.study;
    campaign
        .results
        .par_iter()
        .map(|(spec, h)| {
            let name = &spec.name;
            let r = (|| -> Result<SpecimenDamage, String> {
                let h = h.as_ref().map_err(|e| e.to_string())?;
                // D at the measured fracture instant.
                let p = path_to_stop(name, h);
                let at_stop = accumulate(locus, rule, &p.eqps, &p.triaxiality, &p.lode_angle_param)
                    .map_err(|e| e.to_string())?;
                // The whole history at the same entity, to find where D reaches 1.
                let series = Series::open(&study.result_path(spec)).map_err(|e| e.to_string())?;
                let mut req: HistoryRequest = spec.request().map_err(|e| e.to_string())?;
                req.selector = match h.point.location {
                    Location::Cell => Selector::Cell(h.point.id),
                    Location::Point => Selector::Point(h.point.id),
                };
                req.stop = None;
                req.band = None;
                let full = ductrace_track::extract(&series, &req).map_err(|e| e.to_string())?;
                let eqps: Vec<f64> = full.rows.iter().map(|r| r.eqps).collect();
                let eta: Vec<Option<f64>> = full.rows.iter().map(|r| r.triaxiality).collect();
                let theta: Vec<Option<f64>> =
                    full.rows.iter().map(|r| r.lode_angle_param).collect();
                let d = accumulate(locus, rule, &eqps, &eta, &theta).map_err(|e| e.to_string())?;
                let gauge: Vec<Option<f64>> = full.rows.iter().map(|r| r.gauge).collect();
                let (inc, g_fail) = match d.crossing {
                    Some(c) => {
                        let g = match (
                            gauge.get(c.row).copied().flatten(),
                            gauge.get(c.row + 1).copied().flatten(),
                        ) {
                            (Some(a), Some(b)) => Some(lerp(a, b, c.fraction)),
                            _ => None,
                        };
                        (Some(c.position()), g)
                    }
                    None => (None, None),
                };
                let measured = spec.gauge_measured();
                let difference = match (g_fail, measured) {
                    (Some(g), Some(m)) => Some(g - m),
                    _ => None,
                };
                let difference_percent = match (difference, measured) {
                    (Some(d), Some(m)) if m != 0.0 => Some(100.0 * d / m),
                    _ => None,
                };
                let curve = gauge
                    .iter()
                    .zip(&d.damage)
                    .filter_map(|(g, dd)| g.map(|g| (g, *dd)))
                    .collect();
                Ok(SpecimenDamage {
                    specimen: name.clone(),
                    damage_end: at_stop.final_damage(),
                    increment_at_failure: inc,
                    gauge_at_failure: g_fail,
                    gauge_measured: measured,
                    difference,
                    difference_percent,
                    curve,
                    damage_series_end: d.final_damage(),
                })
            })();
            (name.clone(), r)
        })
        .collect()
}

fn opt(v: Option<f64>) -> Value {
    v.map_or(Value::Null, |x| json!(x))
}

/// The study damage check as JSON.
pub fn study_json(results: &[(String, Result<SpecimenDamage, String>)], rule: DamageRule) -> Value {
    let specimens: Vec<Value> = results
        .iter()
        .map(|(name, r)| match r {
            Ok(d) => json!({
                "specimen": d.specimen,
                "damage_end": d.damage_end,
                "increment_at_failure": opt(d.increment_at_failure),
                "gauge_at_failure": opt(d.gauge_at_failure),
                "gauge_measured": opt(d.gauge_measured),
                "difference": opt(d.difference),
                "difference_percent": opt(d.difference_percent),
                "damage_series_end": d.damage_series_end,
                "curve": d.curve,
            }),
            Err(e) => json!({"specimen": name, "error": e}),
        })
        .collect();
    json!({ "rule": rule_name(rule), "specimens": specimens })
}

fn rule_name(rule: DamageRule) -> String {
    match rule {
        DamageRule::Linear => "linear (Johnson & Cook 1985), trapezoid on 1/eps_f over eqps".into(),
        DamageRule::PowerLaw { exponent } => {
            format!("power law, exponent {exponent} (Xue 2007), D = (integral of d eqps/eps_f)^m")
        }
    }
}

pub fn study_text(
    results: &[(String, Result<SpecimenDamage, String>)],
    rule: DamageRule,
) -> String {
    let d = |v: Option<f64>| output::num_text(v, 4);
    let rows: Vec<Vec<String>> = results
        .iter()
        .filter_map(|(_, r)| r.as_ref().ok())
        .map(|s| {
            vec![
                s.specimen.clone(),
                d(Some(s.damage_end)),
                d(s.increment_at_failure),
                d(s.gauge_at_failure),
                d(s.gauge_measured),
                d(s.difference),
                d(s.difference_percent),
            ]
        })
        .collect();
    let mut out = format!("damage rule: {}\n\n", rule_name(rule));
    out.push_str(&output::table(
        &[
            "specimen",
            "D at test fracture",
            "increment at D=1",
            "gauge at D=1",
            "gauge measured",
            "difference",
            "difference %",
        ],
        &rows,
    ));
    for (name, r) in results {
        if let Err(e) = r {
            out.push_str(&format!("failed: {name}: {e}\n"));
        }
    }
    out
}

/// The outcome of a full-field damage pass.
pub struct FieldDamage {
    /// Point or cell data.
    pub location: Location,
    /// Damage state per entity after the last increment.
    pub cells: Vec<CellDamage>,
    /// Increment times.
    pub times: Vec<f64>,
}

/// What a full-field damage pass must leave in the [`FieldState`] its callback sees.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PassNeeds {
    /// Compute θ̄ (the locus or the callback uses it).
    pub lode: Lode,
    /// Keep the decoded stress array (the callback writes it).
    pub stress: bool,
}

/// Streams every increment of a result and accumulates damage at every entity.
///
/// Uncompressed binary data whose stress the callback does not need
/// ([`Increment::ranges_are_direct`], `needs.stress` false) are decoded chunk by chunk by
/// the threads that evaluate them ([`FieldState::load_direct`]): nothing is copied whole.
/// Otherwise a two-stage pipeline: while increment k is evaluated and accumulated (in
/// parallel over entities), increment k + 1 is decoded into a second [`FieldState`]
/// (`rayon::join`), so decoding (inflating, for compressed data) and arithmetic overlap.
/// `each` sees the increments in order either way, and errors are reported in increment
/// order (those of k before the decoding error of k + 1).
pub fn field_damage(
    series: &Series,
    options: &ductrace_track::FieldOptions,
    locus: &Locus,
    rule: DamageRule,
    needs: PassNeeds,
    mut each: impl FnMut(usize, &FieldState, &[CellDamage]) -> Result<(), Failure>,
) -> Result<FieldDamage, Failure> {
    let fields = ductrace_track::fields::resolve(series, options, true, false)?;
    let mut state = FieldState::default();
    let mut cells: Vec<CellDamage> = Vec::new();
    let mut times = Vec::new();
    let infos = series.increments();
    let allow = options.allow_nonfinite;
    let lode = needs.lode;
    let direct = |inc: &Increment<'_>| -> Result<bool, Failure> {
        let eqps = match &fields.eqps {
            Some(EqpsSource::Scalar(name)) => name,
            _ => return Ok(false), // the fetch path words the error
        };
        Ok(!needs.stress
            && inc.ranges_are_direct(&fields.stress, fields.location)?
            && inc.ranges_are_direct(eqps, fields.location)?)
    };
    let first = match infos.first() {
        Some(i) => Some(series.increment(i.index)?),
        None => None,
    };
    if let Some(inc) = &first
        && direct(inc)?
    {
        let mut first = first;
        for info in infos {
            let k = info.index;
            // the first increment is already open; the others are opened in turn
            let this = match first.take() {
                Some(i) => i,
                None => series.increment(k)?,
            };
            if direct(&this)? {
                state.load_direct(series, &this, &fields, allow, lode)?;
            } else {
                state.load(series, &this, &fields, allow, lode)?;
            }
            drop(this);
            accumulate_increment(series, locus, rule, k, allow, &mut state, &mut cells)?;
            times.push(info.time);
            each(k, &state, &cells)?;
        }
        return Ok(FieldDamage {
            location: fields.location,
            cells,
            times,
        });
    }
    let mut spare = FieldState::default();
    if let Some(inc) = first {
        state.fetch(series, &inc, &fields)?;
    }
    for (pos, info) in infos.iter().enumerate() {
        let k = info.index;
        let next = infos.get(pos + 1).map(|i| i.index);
        let (fetched, done) = rayon::join(
            || -> Result<(), Failure> {
                match next {
                    Some(j) => {
                        let inc = series.increment(j)?;
                        spare.fetch(series, &inc, &fields)
                    }
                    None => Ok(()),
                }
            },
            || -> Result<(), Failure> {
                state.evaluate(series, k, &fields, allow, lode)?;
                accumulate_increment(series, locus, rule, k, allow, &mut state, &mut cells)
            },
        );
        done?;
        times.push(info.time);
        each(k, &state, &cells)?;
        fetched?;
        std::mem::swap(&mut state, &mut spare);
    }
    Ok(FieldDamage {
        location: fields.location,
        cells,
        times,
    })
}

/// One increment of [`field_damage`]: carries ε̄p over non-finite values (when allowed),
/// then starts (k = 0) or advances every entity's damage, in parallel chunks.
fn accumulate_increment(
    series: &Series,
    locus: &Locus,
    rule: DamageRule,
    k: usize,
    allow_nonfinite: bool,
    state: &mut FieldState,
    cells: &mut Vec<CellDamage>,
) -> Result<(), Failure> {
    const CHUNK: usize = 8192;
    if allow_nonfinite {
        for i in 0..state.eqps.len() {
            if !state.eqps[i].is_finite() {
                state.eqps[i] = cells.get(i).map_or(0.0, |c| c.eqps());
                state.defined[i] = false;
            }
        }
    }
    // θ̄ is there unless the pass left it out (Lode::Skip) for a locus that ignores it.
    let fields_k = if state.lode_angle_param.len() == state.eqps.len() {
        IncrementFields::new(
            k,
            &state.eqps,
            &state.triaxiality,
            &state.lode_angle_param,
            &state.defined,
        )
    } else {
        IncrementFields::without_lode_angle(k, &state.eqps, &state.triaxiality, &state.defined)
    }
    .map_err(|e| Failure::data(format!("{}: {e}", series.path().display())))?;
    if k == 0 {
        *cells = vec![CellDamage::new(); state.eqps.len()];
        cells
            .par_chunks_mut(CHUNK)
            .enumerate()
            .try_for_each(|(c, chunk)| {
                start_cells(
                    locus,
                    &fields_k.window(c * CHUNK, chunk.len()),
                    c * CHUNK,
                    chunk,
                )
            })
    } else {
        cells
            .par_chunks_mut(CHUNK)
            .enumerate()
            .try_for_each(|(c, chunk)| {
                update_cells(
                    locus,
                    rule,
                    &fields_k.window(c * CHUNK, chunk.len()),
                    c * CHUNK,
                    chunk,
                )
            })
    }
    .map_err(|e| Failure::data(format!("{}: {e}", series.path().display())))
}

fn field_json(
    series: &Series,
    fd: &FieldDamage,
    rule: DamageRule,
    top: usize,
) -> Result<Value, Failure> {
    let reference = series.mesh()?;
    // Reference coordinates of the reported entities only (cell centroid or point).
    let coords_of = |i: usize| -> Option<[f64; 3]> {
        match fd.location {
            Location::Cell => (i < reference.n_cells()).then(|| reference.centroid(i)),
            Location::Point => reference.points().get(i).copied(),
        }
    };
    let loc = fd.location.to_string();
    let first = fd
        .cells
        .iter()
        .enumerate()
        .filter_map(|(i, c)| c.crossing().map(|x| (i, x)))
        .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
    let time_at = |x: f64| {
        let k = x.floor() as usize;
        let f = x - k as f64;
        match (fd.times.get(k), fd.times.get(k + 1)) {
            (Some(a), Some(b)) => lerp(*a, *b, f),
            (Some(a), None) => *a,
            _ => f64::NAN,
        }
    };
    let mut ranked: Vec<(usize, f64)> = fd
        .cells
        .iter()
        .enumerate()
        .map(|(i, c)| (i, c.damage(rule)))
        .collect();
    let order = |a: &(usize, f64), b: &(usize, f64)| b.1.total_cmp(&a.1).then(a.0.cmp(&b.0));
    let k = (top + 1).min(ranked.len());
    if k > 0 && k < ranked.len() {
        ranked.select_nth_unstable_by(k - 1, order);
        ranked.truncate(k);
    }
    ranked.sort_by(order);
    let entry = |&(i, d): &(usize, f64)| json!({"location": loc, "id": i, "damage": d, "coords": coords_of(i)});
    Ok(json!({
        "rule": rule_name(rule),
        "first": first.map(|(i, x)| json!({
            "location": loc, "id": i, "increment": x, "time": time_at(x),
            "coords": coords_of(i),
        })),
        "max": ranked.first().map(entry),
        "runners_up": ranked.iter().skip(1).map(entry).collect::<Vec<_>>(),
        "increments": fd.times.len(),
        "entities": fd.cells.len(),
    }))
}

/// Runs `ductrace damage`.
pub fn run(args: &DamageArgs, quiet: bool) -> Result<(), Failure> {
    let locus = locusfile::read(&args.locus)?;
    let rule = match args.exponent {
        None => DamageRule::Linear,
        Some(m) => {
            let r = DamageRule::PowerLaw { exponent: m };
            r.validate()
                .map_err(|e| Failure::usage(format!("--exponent: {e}")))?;
            r
        }
    };
    let is_study = args
        .input
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("toml"));
    let (text, failed) = if is_study {
        let study = Study::load(&args.input)?;
        let campaign = crate::cmd::table::run_campaign(study, quiet);
        let results = check_study(&campaign, &locus, rule);
        let failed = results.iter().filter(|(_, r)| r.is_err()).count();
        let text = match args.format {
            Format::Json => json_text(&study_json(&results, rule))?,
            _ => study_text(&results, rule),
        };
        (text, failed)
    } else {
        let series = Series::open(&args.input)?;
        let options = super::field_options(&args.fields)?;
        // θ̄ only for a locus that depends on it (Johnson–Cook does not).
        let needs = PassNeeds {
            lode: if locus.uses_lode_angle() {
                Lode::Compute
            } else {
                Lode::Skip
            },
            stress: false,
        };
        // The reference mesh (for the coordinates of the reported entities) is decoded while
        // the pass runs: the pass needs only cell or point data.
        let (fd, mesh) = rayon::join(
            || field_damage(&series, &options, &locus, rule, needs, |_, _, _| Ok(())),
            || series.mesh().map(|_| ()),
        );
        let fd = fd?;
        mesh?;
        let mut v = field_json(&series, &fd, rule, 5)?;
        // The history of the critical entity (the first to reach D = 1, else the largest D),
        // read back for that entity alone, with its damage per increment.
        let critical = v["first"]["id"].as_u64().or(v["max"]["id"].as_u64());
        if let Some(id) = critical {
            let id = id as usize;
            let mut req = HistoryRequest::new(match fd.location {
                Location::Cell => Selector::Cell(id),
                Location::Point => Selector::Point(id),
            });
            req.fields = options.clone();
            req.fields.location = Some(fd.location);
            let h = ductrace_track::extract(&series, &req)?;
            let eqps: Vec<f64> = h.rows.iter().map(|r| r.eqps).collect();
            let eta: Vec<Option<f64>> = h.rows.iter().map(|r| r.triaxiality).collect();
            let theta: Vec<Option<f64>> = h.rows.iter().map(|r| r.lode_angle_param).collect();
            let d = accumulate(&locus, rule, &eqps, &eta, &theta)
                .map_err(|e| Failure::data(format!("{}: {e}", args.input.display())))?;
            let mut doc = crate::cmd::history::to_json(&h, false);
            if let Some(rows) = doc["rows"].as_array_mut() {
                for (row, dk) in rows.iter_mut().zip(&d.damage) {
                    row["damage"] = json!(dk);
                }
            }
            v["history"] = json!({
                "location": fd.location.to_string(),
                "id": id,
                "rows": doc["rows"],
                "summary": doc["summary"],
            });
        }
        let text = match args.format {
            Format::Json => json_text(&v)?,
            _ => field_text(&v, &series, &fd),
        };
        (text, 0)
    };
    output::emit(
        text.as_bytes(),
        args.output.as_deref(),
        &[&args.input, &args.locus],
    )?;
    if failed > 0 {
        return Err(Failure::data(format!("{failed} specimens failed")));
    }
    Ok(())
}

fn json_text(v: &Value) -> Result<String, Failure> {
    let mut s = serde_json::to_string_pretty(v)
        .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
    s.push('\n');
    Ok(s)
}

fn field_text(v: &Value, series: &Series, fd: &FieldDamage) -> String {
    let mut out = format!(
        "damage over {} {}s and {} increments of {}\n",
        fd.cells.len(),
        fd.location,
        fd.times.len(),
        series.path().display()
    );
    let c = |v: &Value| -> String {
        let a = v.as_array();
        match a {
            Some(a) if a.len() == 3 => coords(&[
                a[0].as_f64().unwrap_or(0.0),
                a[1].as_f64().unwrap_or(0.0),
                a[2].as_f64().unwrap_or(0.0),
            ]),
            _ => "?".into(),
        }
    };
    match v["first"].as_object() {
        Some(f) => out.push_str(&format!(
            "first to reach D = 1: {} {} at {}, increment {:.4} (time {})\n",
            f["location"].as_str().unwrap_or(""),
            f["id"],
            c(&f["coords"]),
            f["increment"].as_f64().unwrap_or(f64::NAN),
            f["time"]
        )),
        None => out.push_str("no entity reaches D = 1\n"),
    }
    if let Some(m) = v["max"].as_object() {
        out.push_str(&format!(
            "largest D = {:.4} at {} {} {}\n",
            m["damage"].as_f64().unwrap_or(f64::NAN),
            m["location"].as_str().unwrap_or(""),
            m["id"],
            c(&m["coords"])
        ));
    }
    out.push_str("runners-up:\n");
    for r in v["runners_up"].as_array().into_iter().flatten() {
        out.push_str(&format!(
            "  {} {}  D = {:.4}  at {}\n",
            r["location"].as_str().unwrap_or(""),
            r["id"],
            r["damage"].as_f64().unwrap_or(f64::NAN),
            c(&r["coords"])
        ));
    }
    out
}
