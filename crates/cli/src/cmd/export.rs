//! `ductrace export RESULT -o DIR`: a VTU series of the derived fields, for any VTK viewer.
//!
//! One `.vtu` per increment (appended raw binary, UInt64 header, Float64) and a `.pvd`
//! listing them with their times, written last. Arrays, at the stress's location (point or
//! cell data): `stress` (6 components, VTK order), `sigma_h`, `sigma_vm`, `triaxiality`, `lode_angle_param`, `eqps`, and
//! `damage` when a locus is given; the displacement is copied as point data when present.
//! **Undefined values (η and θ̄ where σ_vm = 0) are written as NaN**, the only place where
//! ductrace writes NaN: VTK formats have no other way to say "no value".

use std::path::PathBuf;

use ductrace_locus::{CellDamage, DamageRule, Locus};
use ductrace_vtk::write::{ArrayRef, CellsRef, VtuOptions, write_pvd, write_vtu_with};
use ductrace_vtk::{Location, Series};

use crate::args::ExportArgs;
use crate::cmd::damage::{PassNeeds, field_damage};
use crate::failure::Failure;
use crate::fieldpass::{FieldState, Lode};
use crate::locusfile;
use crate::output;
use crate::progress;

/// Runs `ductrace export`.
pub fn run(args: &ExportArgs, quiet: bool) -> Result<(), Failure> {
    let series = Series::open(&args.result)?;
    let options = super::field_options(&args.fields)?;
    let locus: Option<Locus> = match &args.locus {
        Some(p) => Some(locusfile::read(p)?),
        None => None,
    };
    let dir = &args.output;
    if dir.exists() && !dir.is_dir() {
        return Err(Failure::usage(format!(
            "{}: exists and is not a folder",
            dir.display()
        )));
    }
    // Nothing lost: the output folder is not the input folder, and no file written (an
    // increment's .vtu, the .pvd) is one of the inputs.
    let inputs = output::series_inputs(&series);
    let refs: Vec<&std::path::Path> = inputs.iter().map(|p| p.as_path()).collect();
    if args.result.is_dir() {
        output::refuse_inputs(dir, &[&args.result]).map_err(|_| {
            Failure::usage(format!(
                "{}: refusing to export into the input folder; choose another output folder",
                dir.display()
            ))
        })?;
    }
    output::refuse_inputs(&dir.join("derived.pvd"), &refs)?;
    for info in series.increments() {
        output::refuse_inputs(&dir.join(file_name(info.index)), &refs)?;
    }
    std::fs::create_dir_all(dir).map_err(|e| Failure::io(dir, "create", e))?;
    remove_stale_temporaries(dir);
    let mesh = series.mesh()?;
    let cells = CellsRef::of(mesh);
    let fields = ductrace_track::fields::resolve(&series, &options, true, false)?;
    let location = fields.location;
    let displacement = fields.displacement.clone();
    let pb = progress::bar(series.increments().len() as u64, "export", quiet);
    let mut written: Vec<(f64, PathBuf)> = Vec::new();
    let mut tri = Vec::new();
    let mut lode = Vec::new();
    let mut dmg = Vec::new();
    let mut disp = Vec::new();
    let mut stress6: Vec<f64> = Vec::new();
    let order = fields.stress_order;
    let width = fields.stress_components;
    let mut write_one = |k: usize,
                         state: &FieldState,
                         cells_d: Option<&[CellDamage]>,
                         rule: DamageRule|
     -> Result<(), Failure> {
        let info = &series.increments()[k];
        tri.clear();
        lode.clear();
        for i in 0..state.defined.len() {
            let ok = state.defined[i];
            tri.push(if ok { state.triaxiality[i] } else { f64::NAN });
            lode.push(if ok {
                state.lode_angle_param[i]
            } else {
                f64::NAN
            });
        }
        // The stress itself, in VTK's symmetric order, so the export can be read again.
        stress6.clear();
        for t in state.stress.chunks_exact(width) {
            match ductrace_tensor::Stress::from_slice(t, &order) {
                Ok(s) => stress6.extend_from_slice(&s.vtk6()),
                Err(_) => stress6.extend_from_slice(&[f64::NAN; 6]),
            }
        }
        let mut arrays = vec![
            ArrayRef {
                name: "stress",
                components: 6,
                data: &stress6,
            },
            ArrayRef {
                name: "sigma_h",
                components: 1,
                data: &state.sigma_h,
            },
            ArrayRef {
                name: "sigma_vm",
                components: 1,
                data: &state.sigma_vm,
            },
            ArrayRef {
                name: "triaxiality",
                components: 1,
                data: &tri,
            },
            ArrayRef {
                name: "lode_angle_param",
                components: 1,
                data: &lode,
            },
            ArrayRef {
                name: "eqps",
                components: 1,
                data: &state.eqps,
            },
        ];
        if let Some(c) = cells_d {
            dmg.clear();
            dmg.extend(c.iter().map(|c| c.damage(rule)));
            arrays.push(ArrayRef {
                name: "damage",
                components: 1,
                data: &dmg,
            });
        }
        let mut point_arrays: Vec<ArrayRef<'_>> = Vec::new();
        if let Some(name) = &displacement {
            let inc = series.increment(k)?;
            inc.read(name, Location::Point, &mut disp)?;
            point_arrays.push(ArrayRef {
                name: "displacement",
                components: 3,
                data: &disp,
            });
        }
        let (pd, cd): (Vec<ArrayRef<'_>>, Vec<ArrayRef<'_>>) = match location {
            Location::Cell => (point_arrays, arrays),
            Location::Point => {
                let mut p = point_arrays;
                p.extend(arrays);
                (p, Vec::new())
            }
        };
        let path = dir.join(file_name(k));
        write_vtu_with(
            &path,
            mesh.points(),
            &cells,
            &pd,
            &cd,
            &VtuOptions::with_time(info.time),
        )?;
        written.push((info.time, PathBuf::from(file_name(k))));
        pb.inc(1);
        Ok(())
    };
    match &locus {
        Some(l) => {
            field_damage(
                &series,
                &options,
                l,
                DamageRule::Linear,
                PassNeeds {
                    lode: Lode::Compute,
                    stress: true,
                },
                |k, state, cells_d| write_one(k, state, Some(cells_d), DamageRule::Linear),
            )?;
        }
        None => {
            let mut state = FieldState::default();
            for info in series.increments() {
                let inc = series.increment(info.index)?;
                state.load(
                    &series,
                    &inc,
                    &fields,
                    options.allow_nonfinite,
                    Lode::Compute,
                )?;
                write_one(info.index, &state, None, DamageRule::Linear)?;
            }
        }
    }
    pb.finish_and_clear();
    let entries: Vec<(f64, &std::path::Path)> =
        written.iter().map(|(t, p)| (*t, p.as_path())).collect();
    let pvd = dir.join("derived.pvd");
    write_pvd(&pvd, &entries)?;
    if !quiet {
        eprintln!(
            "ductrace: wrote {} increments to {} ({} data; undefined values as NaN)",
            written.len(),
            pvd.display(),
            location
        );
    }
    Ok(())
}

/// Removes the hidden temporary files an interrupted export left in `dir`
/// (`.derived_NNNN.vtu.PID.tmp`, `.derived.pvd.PID.tmp`: the writer's temporary names); they
/// are never complete outputs. Best effort: errors are ignored.
fn remove_stale_temporaries(dir: &std::path::Path) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let name = e.file_name();
        let name = name.to_string_lossy();
        if name.starts_with(".derived") && name.ends_with(".tmp") && e.path().is_file() {
            let _ = std::fs::remove_file(e.path());
        }
    }
}

fn file_name(k: usize) -> String {
    format!("derived_{k:04}.vtu")
}
