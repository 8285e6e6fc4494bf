//! `ductrace probe RESULT`: the catalogue of a result, decoding no array.

use ductrace_vtk::Series;
use ductrace_vtk::roles::{self, RoleOverrides};
use serde::Serialize;

use crate::args::ProbeArgs;
use crate::failure::Failure;
use crate::output::{self, Format};

#[derive(Serialize)]
struct IncrementRec {
    index: usize,
    time: f64,
    file: String,
}

#[derive(Serialize)]
struct CellTypeRec {
    /// VTK cell type id.
    id: u8,
    /// VTK cell type name.
    name: &'static str,
    count: usize,
}

#[derive(Serialize)]
struct FieldRec {
    name: String,
    location: String,
    components: usize,
    #[serde(rename = "type")]
    scalar_type: String,
    component_names: Vec<String>,
    encoding: String,
}

#[derive(Serialize, Default)]
struct RolesRec {
    stress: Option<String>,
    eqps: Option<String>,
    plastic_strain: Option<String>,
    displacement: Option<String>,
}

#[derive(Serialize)]
struct ProbeRec {
    result: String,
    discovery: String,
    increments: Vec<IncrementRec>,
    points: usize,
    cells: usize,
    cell_types: Vec<CellTypeRec>,
    fields: Vec<FieldRec>,
    roles: RolesRec,
    /// Why role detection failed, when it did (ambiguous names, say).
    role_problem: Option<String>,
    reference: &'static str,
}

/// Runs `ductrace probe`.
pub fn run(args: &ProbeArgs) -> Result<(), Failure> {
    let series = Series::open(&args.result)?;
    let mesh = series.mesh()?;
    let overrides = RoleOverrides {
        stress: args.fields.stress.clone(),
        eqps: args.fields.eqps.clone(),
        plastic_strain: args.fields.plastic_strain.clone(),
        displacement: args.fields.displacement.clone(),
    };
    let (roles, role_problem) = match roles::detect(series.fields(), &overrides) {
        Ok(r) => (
            RolesRec {
                stress: r.stress.map(|f| f.name),
                eqps: r.eqps.map(|f| f.name),
                plastic_strain: r.plastic_strain.map(|f| f.name),
                displacement: r.displacement.map(|f| f.name),
            },
            None,
        ),
        Err(e) => (RolesRec::default(), Some(e.to_string())),
    };
    let rec = ProbeRec {
        result: args.result.display().to_string(),
        discovery: series.discovery().to_string(),
        increments: series
            .increments()
            .iter()
            .map(|i| IncrementRec {
                index: i.index,
                time: i.time,
                file: i.file.display().to_string(),
            })
            .collect(),
        points: mesh.n_points(),
        cells: mesh.n_cells(),
        cell_types: mesh
            .cell_type_counts()
            .into_iter()
            .map(|(id, name, count)| CellTypeRec { id, name, count })
            .collect(),
        fields: series
            .fields()
            .iter()
            .map(|f| FieldRec {
                name: f.name.clone(),
                location: f.location.to_string(),
                components: f.components,
                scalar_type: f.scalar_type.to_string(),
                component_names: f.component_names.clone(),
                encoding: f.encoding.clone(),
            })
            .collect(),
        roles,
        role_problem,
        reference: "the points of the first increment",
    };
    let text = match args.format {
        Format::Json | Format::Csv => {
            if args.format == Format::Csv {
                return Err(Failure::usage("probe writes text or json, not csv"));
            }
            let mut s = serde_json::to_string_pretty(&rec)
                .map_err(|e| Failure::data(format!("cannot encode JSON: {e}")))?;
            s.push('\n');
            s
        }
        Format::Text => text(&rec),
    };
    let inputs = output::series_inputs(&series);
    let refs: Vec<&std::path::Path> = inputs.iter().map(|p| p.as_path()).collect();
    output::emit(text.as_bytes(), args.output.as_deref(), &refs)
}

fn text(rec: &ProbeRec) -> String {
    let mut s = String::new();
    s.push_str(&format!("result      {}\n", rec.result));
    s.push_str(&format!(
        "increments  {} ({})\n",
        rec.increments.len(),
        rec.discovery
    ));
    if let (Some(a), Some(b)) = (rec.increments.first(), rec.increments.last()) {
        s.push_str(&format!("times       {} to {}\n", a.time, b.time));
    }
    s.push_str(&format!(
        "mesh        {} points, {} cells (reference: {})\n",
        rec.points, rec.cells, rec.reference
    ));
    for c in &rec.cell_types {
        s.push_str(&format!(
            "            {:>8}  {} (type {})\n",
            c.count, c.name, c.id
        ));
    }
    s.push('\n');
    let rows: Vec<Vec<String>> = rec
        .fields
        .iter()
        .map(|f| {
            vec![
                f.name.clone(),
                f.location.clone(),
                f.components.to_string(),
                f.scalar_type.clone(),
                f.component_names.join(","),
                f.encoding.clone(),
            ]
        })
        .collect();
    s.push_str(&output::table(
        &[
            "field",
            "location",
            "components",
            "type",
            "component names",
            "encoding",
        ],
        &rows,
    ));
    s.push('\n');
    let role = |v: &Option<String>| v.clone().unwrap_or_else(|| "—".into());
    s.push_str(&format!(
        "stress                     {}\n",
        role(&rec.roles.stress)
    ));
    s.push_str(&format!(
        "equivalent plastic strain  {}\n",
        role(&rec.roles.eqps)
    ));
    s.push_str(&format!(
        "plastic strain tensor      {}\n",
        role(&rec.roles.plastic_strain)
    ));
    s.push_str(&format!(
        "displacement               {}\n",
        role(&rec.roles.displacement)
    ));
    if let Some(p) = &rec.role_problem {
        s.push_str(&format!("roles: {p}\n"));
    }
    s
}
