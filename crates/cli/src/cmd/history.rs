//! `ductrace history`: the stress-state history at one point or cell, and its averages.

use ductrace_track::{GaugeSpec, History, HistoryRequest, Selector, Stop};
use ductrace_vtk::Series;
use serde_json::{Map, Value, json};

use crate::args::HistoryArgs;
use crate::failure::Failure;
use crate::output::{self, Format};

/// The row columns, in order (CSV header and JSON keys).
pub const COLUMNS: [&str; 11] = [
    "increment",
    "time",
    "eqps",
    "sigma_h",
    "sigma_vm",
    "triaxiality",
    "lode_angle_param",
    "lode_param",
    "sigma_1",
    "sigma_2",
    "sigma_3",
];

/// Builds the request from the arguments.
pub fn request(args: &HistoryArgs) -> Result<HistoryRequest, Failure> {
    let selector: Selector = args.at.parse()?;
    let mut req = HistoryRequest::new(selector);
    req.stop = match &args.until {
        Some(s) => Some(s.parse::<Stop>()?),
        None => None,
    };
    req.gauge = match &args.gauge {
        Some(g) => Some(g.parse::<GaugeSpec>()?),
        None => None,
    };
    if matches!(req.stop, Some(Stop::Gauge(_))) && req.gauge.is_none() {
        return Err(Failure::usage(
            "--until gauge:U needs a gauge definition: add --gauge X1,Y1,Z1:X2,Y2,Z2 or --gauge X,Y,Z/AXIS",
        ));
    }
    req.band = args.band;
    req.fields = super::field_options(&args.fields)?;
    Ok(req)
}

/// Runs `ductrace history`.
pub fn run(args: &HistoryArgs, quiet: bool) -> Result<(), Failure> {
    let req = request(args)?;
    let series = Series::open(&args.result)?;
    let inputs = output::series_inputs(&series);
    let refs: Vec<&std::path::Path> = inputs.iter().map(|p| p.as_path()).collect();
    output::check_target(args.output.as_deref(), &refs)?;
    let h = ductrace_track::extract(&series, &req)?;
    if !quiet {
        for note in notes(&h) {
            eprintln!("ductrace: {note}");
        }
    }
    let with_gauge = req.gauge.is_some();
    let text = match args.format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&to_json(&h, with_gauge))
                .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
            s.push('\n');
            s
        }
        Format::Csv => to_csv(&h, with_gauge),
        Format::Text => to_text(&h, with_gauge),
    };
    output::emit(text.as_bytes(), args.output.as_deref(), &refs)
}

/// Remarks for stderr: how the point was chosen, which arrays and conventions were used.
pub fn notes(h: &History) -> Vec<String> {
    let mut v = vec![format!(
        "{} {} at {}{}; stress {:?} ({}), equivalent plastic strain: {}",
        h.point.location,
        h.point.id,
        coords(&h.point.coords),
        h.point
            .distance
            .map(|d| format!(
                ", {} from the requested coordinates",
                output::num_text(Some(d), 4)
            ))
            .unwrap_or_default(),
        h.fields.stress,
        h.fields.order_source.describe(),
        h.fields
            .eqps
            .as_ref()
            .map(|e| e.describe())
            .unwrap_or_else(|| "none".into()),
    )];
    if let Some(sel) = &h.selection {
        let ups: Vec<String> = sel
            .runners_up
            .iter()
            .map(|c| format!("{} ({})", c.id, c.value))
            .collect();
        v.push(format!(
            "max:{} = {} at increment {}; runners-up: {}",
            sel.field,
            sel.value,
            sel.at_increment,
            ups.join(", ")
        ));
    }
    v
}

/// Coordinates for messages, to 6 significant digits.
pub fn coords(c: &[f64; 3]) -> String {
    let t = |v: f64| output::num_text(Some(if v.abs() < 1e-12 { 0.0 } else { v }), 6);
    format!("({}, {}, {})", t(c[0]), t(c[1]), t(c[2]))
}

fn opt(v: Option<f64>) -> Value {
    v.map_or(Value::Null, |x| json!(x))
}

/// The JSON document of a history (keys as documented in the command's help).
pub fn to_json(h: &History, with_gauge: bool) -> Value {
    let rows: Vec<Value> = h
        .rows
        .iter()
        .map(|r| {
            let mut m = Map::new();
            m.insert("increment".into(), json!(r.increment));
            m.insert("time".into(), json!(r.time));
            m.insert("eqps".into(), json!(r.eqps));
            m.insert("sigma_h".into(), json!(r.sigma_h));
            m.insert("sigma_vm".into(), json!(r.sigma_vm));
            m.insert("triaxiality".into(), opt(r.triaxiality));
            m.insert("lode_angle_param".into(), opt(r.lode_angle_param));
            m.insert("lode_param".into(), opt(r.lode_param));
            m.insert("sigma_1".into(), json!(r.principal[0]));
            m.insert("sigma_2".into(), json!(r.principal[1]));
            m.insert("sigma_3".into(), json!(r.principal[2]));
            if with_gauge {
                m.insert("gauge".into(), opt(r.gauge));
            }
            Value::Object(m)
        })
        .collect();
    let s = &h.summary;
    let mut doc = json!({
        "point": {
            "location": h.point.location.to_string(),
            "id": h.point.id,
            "coords": h.point.coords,
            "distance": opt(h.point.distance),
        },
        "rows": rows,
        "summary": {
            "eqps": s.eqps,
            "triaxiality_avg": opt(s.triaxiality_avg),
            "lode_angle_param_avg": opt(s.lode_angle_param_avg),
            "triaxiality": opt(s.triaxiality),
            "lode_angle_param": opt(s.lode_angle_param),
            "stop": { "increment": s.stop_increment, "time": s.stop_time },
            "increments_integrated": s.increments_integrated,
            "rule": s.rule,
        },
        "fields": {
            "stress": h.fields.stress,
            "stress_order": h.fields.stress_order.to_string(),
            "stress_order_source": h.fields.order_source.describe(),
            "eqps": h.fields.eqps.as_ref().map(|e| e.describe()),
            "displacement": h.fields.displacement,
        },
    });
    if with_gauge {
        doc["summary"]["gauge"] = opt(s.gauge);
    }
    if let Some(g) = &h.gauge {
        doc["gauge"] = json!({
            "points": g.points.iter().map(|p| json!({
                "id": p.id, "coords": p.coords, "distance": opt(p.distance)
            })).collect::<Vec<_>>(),
        });
    }
    if let Some(sel) = &h.selection {
        doc["selection"] = json!({
            "field": sel.field,
            "value": sel.value,
            "at_increment": sel.at_increment,
            "runners_up": sel.runners_up.iter().map(|c| json!({
                "id": c.id, "coords": c.coords, "value": c.value
            })).collect::<Vec<_>>(),
        });
    }
    if let Some(b) = &h.band {
        let r =
            |x: Option<[f64; 2]>| x.map_or(Value::Null, |[lo, hi]| json!({"min": lo, "max": hi}));
        doc["band"] = json!({
            "k": b.k,
            "ids": b.ids,
            "eqps": r(b.eqps),
            "triaxiality_avg": r(b.triaxiality_avg),
            "lode_angle_param_avg": r(b.lode_angle_param_avg),
            "triaxiality": r(b.triaxiality),
            "lode_angle_param": r(b.lode_angle_param),
        });
    }
    doc
}

fn row_values(r: &ductrace_track::Row, with_gauge: bool) -> Vec<Option<f64>> {
    let mut v = vec![
        Some(r.time),
        Some(r.eqps),
        Some(r.sigma_h),
        Some(r.sigma_vm),
        r.triaxiality,
        r.lode_angle_param,
        r.lode_param,
        Some(r.principal[0]),
        Some(r.principal[1]),
        Some(r.principal[2]),
    ];
    if with_gauge {
        v.push(r.gauge);
    }
    v
}

fn summary_lines(h: &History) -> Vec<(String, String)> {
    let s = &h.summary;
    let d = |v: Option<f64>| output::num(v);
    let mut v = vec![
        ("location".to_string(), h.point.location.to_string()),
        ("id".to_string(), h.point.id.to_string()),
        ("eqps".to_string(), d(Some(s.eqps))),
        ("triaxiality_avg".to_string(), d(s.triaxiality_avg)),
        (
            "lode_angle_param_avg".to_string(),
            d(s.lode_angle_param_avg),
        ),
        ("triaxiality".to_string(), d(s.triaxiality)),
        ("lode_angle_param".to_string(), d(s.lode_angle_param)),
        ("stop_increment".to_string(), d(Some(s.stop_increment))),
        ("stop_time".to_string(), d(Some(s.stop_time))),
    ];
    if let Some(g) = s.gauge {
        v.push(("gauge".to_string(), d(Some(g))));
    }
    v.push((
        "increments_integrated".to_string(),
        s.increments_integrated.to_string(),
    ));
    v.push(("rule".to_string(), s.rule.to_string()));
    v
}

/// CSV: the rows, then the summary as `#` comment lines.
pub fn to_csv(h: &History, with_gauge: bool) -> String {
    let mut out = COLUMNS.join(",");
    if with_gauge {
        out.push_str(",gauge");
    }
    out.push('\n');
    for r in &h.rows {
        out.push_str(&r.increment.to_string());
        for v in row_values(r, with_gauge) {
            out.push(',');
            out.push_str(&output::num(v));
        }
        out.push('\n');
    }
    for (k, v) in summary_lines(h) {
        out.push_str(&format!("# {k} = {v}\n"));
    }
    out
}

/// Text: an aligned table of the rows and the summary.
pub fn to_text(h: &History, with_gauge: bool) -> String {
    let mut header: Vec<&str> = vec![
        "inc", "time", "eqps", "σ_h", "σ_vm", "η", "θ̄", "μ", "σ1", "σ2", "σ3",
    ];
    if with_gauge {
        header.push("gauge");
    }
    let rows: Vec<Vec<String>> = h
        .rows
        .iter()
        .map(|r| {
            std::iter::once(r.increment.to_string())
                .chain(
                    row_values(r, with_gauge)
                        .into_iter()
                        .map(|v| output::num_text(v, 5)),
                )
                .collect()
        })
        .collect();
    let mut out = output::table(&header, &rows);
    let s = &h.summary;
    let d = |v: Option<f64>| output::num_text(v, 6);
    out.push('\n');
    out.push_str(&format!(
        "{} {} at {}\n",
        h.point.location,
        h.point.id,
        coords(&h.point.coords)
    ));
    out.push_str(&format!(
        "stop at increment {} (time {})\n",
        d(Some(s.stop_increment)),
        d(Some(s.stop_time))
    ));
    out.push_str(&format!(
        "equivalent plastic strain at the stop  {}\n",
        d(Some(s.eqps))
    ));
    out.push_str(&format!(
        "average triaxiality η_avg              {}\n",
        d(s.triaxiality_avg)
    ));
    out.push_str(&format!(
        "average Lode angle parameter θ̄_avg     {}\n",
        d(s.lode_angle_param_avg)
    ));
    out.push_str(&format!(
        "triaxiality at the stop                {}\n",
        d(s.triaxiality)
    ));
    out.push_str(&format!(
        "Lode angle parameter at the stop       {}\n",
        d(s.lode_angle_param)
    ));
    if let Some(g) = s.gauge {
        out.push_str(&format!(
            "gauge signal at the stop               {}\n",
            d(Some(g))
        ));
    }
    out.push_str(&format!(
        "averaged over {} increments with plastic flow, {} rule in equivalent plastic strain\n",
        s.increments_integrated, s.rule
    ));
    if let Some(b) = &h.band {
        let r = |x: Option<[f64; 2]>| match x {
            Some([lo, hi]) => format!("{} to {}", d(Some(lo)), d(Some(hi))),
            None => "undefined somewhere".into(),
        };
        out.push_str(&format!(
            "band of {} neighbours: eqps {}, η_avg {}, θ̄_avg {}\n",
            b.k,
            r(b.eqps),
            r(b.triaxiality_avg),
            r(b.lode_angle_param_avg)
        ));
    }
    out
}
