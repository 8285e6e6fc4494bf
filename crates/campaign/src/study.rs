//! The study file: a TOML description of a calibration campaign.
//!
//! ```toml
//! title = "..."
//! [material]
//! name = "..."
//! hardening = { A = 950.0, n = 0.17 }     # σ = A ε^n, for models that need it
//!
//! [[specimen]]
//! name = "nrb-r4"
//! result = "nrb_r4/nrb_r4.pvd"            # relative to the study file
//! at = "near:0,0,0"                       # cell:ID | point:ID | near:X,Y,Z | max:FIELD
//! location = "cell"                       # optional: point or cell data
//! gauge = "0,-12.5,0:0,12.5,0"            # optional: X1,Y1,Z1:X2,Y2,Z2 or X,Y,Z/AXIS
//! stop = { gauge = 0.83 }                 # one of gauge, time, eqps, increment
//! kind = "round-bar"                      # round-bar | plate | shear | other
//! notch = { a = 4.0, R = 4.0 }            # round bar a, R; plate t, R
//! measured = { d0 = 8.0, df = 6.1 }       # round bar d0, df; plate t0, tf
//! fields = { stress = "stress_ip", eqps = "eqps_ip", displacement = "u_nodal" }
//! band = 8                                # optional: spread over the 8 nearest entities
//! ```
//!
//! Unknown keys are errors naming the key and the line.

use std::path::{Path, PathBuf};

use ductrace_track::{FieldOptions, GaugeSpec, HistoryRequest, Selector, Stop};
use ductrace_vtk::Location;
use serde::Deserialize;

use crate::StudyError;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct StudyFile {
    title: Option<String>,
    material: MaterialFile,
    #[serde(rename = "specimen", default)]
    specimens: Vec<SpecimenFile>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct MaterialFile {
    name: String,
    hardening: Option<HardeningFile>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct HardeningFile {
    #[serde(rename = "A")]
    a: f64,
    n: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SpecimenFile {
    name: String,
    result: PathBuf,
    at: String,
    location: Option<String>,
    gauge: Option<String>,
    stop: Option<StopFile>,
    kind: Option<String>,
    notch: Option<NotchFile>,
    measured: Option<MeasuredFile>,
    fields: Option<FieldsFile>,
    band: Option<usize>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct StopFile {
    gauge: Option<f64>,
    time: Option<f64>,
    eqps: Option<f64>,
    increment: Option<usize>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct NotchFile {
    a: Option<f64>,
    t: Option<f64>,
    #[serde(rename = "R")]
    r: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct MeasuredFile {
    d0: Option<f64>,
    df: Option<f64>,
    t0: Option<f64>,
    tf: Option<f64>,
}

#[derive(Debug, Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct FieldsFile {
    stress: Option<String>,
    stress_order: Option<String>,
    eqps: Option<String>,
    plastic_strain: Option<String>,
    displacement: Option<String>,
    engineering_shear: Option<bool>,
    deformed_points: Option<bool>,
    allow_nonfinite: Option<bool>,
}

/// The kind of specimen, for the geometric estimates.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Smooth or notched round bar (axisymmetric).
    RoundBar,
    /// Plane-strain grooved plate.
    Plate,
    /// Shear specimen.
    Shear,
    /// Anything else.
    Other,
}

impl Kind {
    /// The study-file spelling.
    pub fn name(self) -> &'static str {
        match self {
            Kind::RoundBar => "round-bar",
            Kind::Plate => "plate",
            Kind::Shear => "shear",
            Kind::Other => "other",
        }
    }
}

/// Notch geometry (mesh length unit).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Notch {
    /// Round bar: minimum-section radius a, notch radius R.
    Round {
        /// Minimum-section radius.
        a: f64,
        /// Notch radius.
        r: f64,
    },
    /// Plate: ligament thickness t, groove radius R.
    Plate {
        /// Ligament thickness.
        t: f64,
        /// Groove radius.
        r: f64,
    },
}

/// Sizes measured on the broken specimen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Measured {
    /// Round bar: initial and final minimum diameters.
    Diameters {
        /// Initial diameter.
        d0: f64,
        /// Final diameter.
        df: f64,
    },
    /// Plate: initial and final ligament thicknesses.
    Thicknesses {
        /// Initial thickness.
        t0: f64,
        /// Final thickness.
        tf: f64,
    },
}

/// The fracture instant from the test.
pub type StopSpec = Stop;

/// The array names and conventions of a specimen.
pub type Fields = FieldOptions;

/// The material of the campaign.
#[derive(Debug, Clone, PartialEq)]
pub struct Material {
    /// Its name.
    pub name: String,
    /// Hollomon hardening σ = A ε^n, (A, n), when given.
    pub hardening: Option<(f64, f64)>,
}

/// One specimen of a study.
#[derive(Debug, Clone)]
pub struct SpecimenSpec {
    /// Short id.
    pub name: String,
    /// Result path as written (relative to the study file).
    pub result: PathBuf,
    /// Critical-point selector.
    pub selector: Selector,
    /// Gauge, when defined.
    pub gauge: Option<GaugeSpec>,
    /// The fracture instant; `None` for the last increment.
    pub stop: Option<Stop>,
    /// Specimen kind.
    pub kind: Kind,
    /// Notch geometry.
    pub notch: Option<Notch>,
    /// Measured sizes.
    pub measured: Option<Measured>,
    /// Arrays and conventions.
    pub fields: FieldOptions,
    /// Band size, when asked for.
    pub band: Option<usize>,
}

impl SpecimenSpec {
    /// The history request of this specimen.
    pub fn request(&self) -> Result<HistoryRequest, StudyError> {
        let mut r = HistoryRequest::new(self.selector.clone());
        r.stop = self.stop;
        r.gauge = self.gauge;
        r.band = self.band;
        r.fields = self.fields.clone();
        Ok(r)
    }

    /// The measured fracture value of the gauge signal, when the stop is a gauge stop.
    pub fn gauge_measured(&self) -> Option<f64> {
        match self.stop {
            Some(Stop::Gauge(u)) => Some(u),
            _ => None,
        }
    }
}

/// A parsed study.
#[derive(Debug, Clone)]
pub struct Study {
    /// The study file.
    pub path: PathBuf,
    /// Title.
    pub title: Option<String>,
    /// Material.
    pub material: Material,
    /// Specimens in file order.
    pub specimens: Vec<SpecimenSpec>,
}

fn line_of(text: &str, offset: usize) -> usize {
    text[..offset.min(text.len())]
        .bytes()
        .filter(|&b| b == b'\n')
        .count()
        + 1
}

impl Study {
    /// Reads and validates a study file.
    pub fn load(path: &Path) -> Result<Study, StudyError> {
        let text = std::fs::read_to_string(path).map_err(|e| StudyError::Io {
            path: path.to_path_buf(),
            source: e,
        })?;
        Study::parse(&text, path)
    }

    /// Parses and validates study text; `path` locates relative result paths and names the
    /// file in messages.
    pub fn parse(text: &str, path: &Path) -> Result<Study, StudyError> {
        let file: StudyFile = toml::from_str(text).map_err(|e| {
            let at = e
                .span()
                .map(|s| format!("line {}: ", line_of(text, s.start)))
                .unwrap_or_default();
            StudyError::Parse {
                path: path.to_path_buf(),
                message: format!("{at}{}", e.message().replace('\n', " ")),
            }
        })?;
        let invalid = |specimen: &str, message: String| StudyError::Invalid {
            path: path.to_path_buf(),
            specimen: specimen.to_string(),
            message,
        };
        if file.specimens.is_empty() {
            return Err(StudyError::Parse {
                path: path.to_path_buf(),
                message: "the study has no [[specimen]] entries".into(),
            });
        }
        let mut specimens = Vec::new();
        for s in file.specimens {
            if specimens.iter().any(|o: &SpecimenSpec| o.name == s.name) {
                return Err(invalid(&s.name, "the name is used twice".into()));
            }
            let selector: Selector =
                s.at.parse()
                    .map_err(|e| invalid(&s.name, format!("at: {e}")))?;
            let gauge = match &s.gauge {
                Some(g) => Some(
                    g.parse::<GaugeSpec>()
                        .map_err(|e| invalid(&s.name, format!("gauge: {e}")))?,
                ),
                None => None,
            };
            let stop = match &s.stop {
                None => None,
                Some(st) => {
                    let given: Vec<Stop> = [
                        st.gauge.map(Stop::Gauge),
                        st.time.map(Stop::Time),
                        st.eqps.map(Stop::Eqps),
                        st.increment.map(Stop::Increment),
                    ]
                    .into_iter()
                    .flatten()
                    .collect();
                    if given.len() != 1 {
                        return Err(invalid(
                            &s.name,
                            format!(
                                "stop must give exactly one of gauge, time, eqps, increment (got {})",
                                given.len()
                            ),
                        ));
                    }
                    Some(given[0])
                }
            };
            if matches!(stop, Some(Stop::Gauge(_))) && gauge.is_none() {
                return Err(invalid(
                    &s.name,
                    "a gauge stop needs a gauge definition".into(),
                ));
            }
            let kind = match s.kind.as_deref() {
                None | Some("other") => Kind::Other,
                Some("round-bar") => Kind::RoundBar,
                Some("plate") => Kind::Plate,
                Some("shear") => Kind::Shear,
                Some(k) => {
                    return Err(invalid(
                        &s.name,
                        format!("kind {k:?} is not one of round-bar, plate, shear, other"),
                    ));
                }
            };
            let notch = match s.notch {
                None => None,
                Some(NotchFile {
                    a: Some(a),
                    t: None,
                    r,
                }) => Some(Notch::Round { a, r }),
                Some(NotchFile {
                    a: None,
                    t: Some(t),
                    r,
                }) => Some(Notch::Plate { t, r }),
                Some(_) => {
                    return Err(invalid(
                        &s.name,
                        "notch needs R and one of a (round bar) or t (plate)".into(),
                    ));
                }
            };
            let measured = match s.measured {
                None => None,
                Some(MeasuredFile {
                    d0: Some(d0),
                    df: Some(df),
                    t0: None,
                    tf: None,
                }) => Some(Measured::Diameters { d0, df }),
                Some(MeasuredFile {
                    d0: None,
                    df: None,
                    t0: Some(t0),
                    tf: Some(tf),
                }) => Some(Measured::Thicknesses { t0, tf }),
                Some(_) => {
                    return Err(invalid(
                        &s.name,
                        "measured needs d0 and df (round bar) or t0 and tf (plate)".into(),
                    ));
                }
            };
            let f = s.fields.unwrap_or_default();
            let location = match s.location.as_deref() {
                None => None,
                Some("cell") => Some(Location::Cell),
                Some("point") => Some(Location::Point),
                Some(l) => {
                    return Err(invalid(
                        &s.name,
                        format!("location {l:?} is not point or cell"),
                    ));
                }
            };
            let stress_order = match &f.stress_order {
                Some(o) => Some(
                    o.parse()
                        .map_err(|e| invalid(&s.name, format!("stress_order: {e}")))?,
                ),
                None => None,
            };
            specimens.push(SpecimenSpec {
                name: s.name,
                result: s.result,
                selector,
                gauge,
                stop,
                kind,
                notch,
                measured,
                fields: FieldOptions {
                    stress: f.stress,
                    stress_order,
                    eqps: f.eqps,
                    plastic_strain: f.plastic_strain,
                    displacement: f.displacement,
                    location,
                    engineering_shear: f.engineering_shear.unwrap_or(false),
                    deformed_points: f.deformed_points.unwrap_or(false),
                    allow_nonfinite: f.allow_nonfinite.unwrap_or(false),
                },
                band: s.band,
            });
        }
        Ok(Study {
            path: path.to_path_buf(),
            title: file.title,
            material: Material {
                name: file.material.name,
                hardening: file.material.hardening.map(|h| (h.a, h.n)),
            },
            specimens,
        })
    }

    /// The folder of the study file.
    pub fn dir(&self) -> PathBuf {
        match self.path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        }
    }

    /// A specimen's result path, resolved against the study file's folder.
    pub fn result_path(&self, spec: &SpecimenSpec) -> PathBuf {
        if spec.result.is_absolute() {
            spec.result.clone()
        } else {
            self.dir().join(&spec.result)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
title = "t"
[material]
name = "invented steel"
hardening = { A = 900.0, n = 0.15 }

[[specimen]]
name = "a"
result = "a/a.pvd"
at = "near:0,0,0"
gauge = "0,-1,0:0,1,0"
stop = { gauge = 0.5 }
kind = "round-bar"
notch = { a = 4.0, R = 2.0 }
measured = { d0 = 8.0, df = 6.0 }
fields = { stress = "stress_ip", eqps = "eqps_ip" }

[[specimen]]
name = "b"
result = "/abs/b"
at = "max:eqps"
kind = "plate"
notch = { t = 2.0, R = 1.0 }
"#;

    #[test]
    fn parses_a_study() {
        let s = Study::parse(GOOD, Path::new("dir/study.toml")).unwrap();
        assert_eq!(s.specimens.len(), 2);
        assert_eq!(s.material.hardening, Some((900.0, 0.15)));
        let a = &s.specimens[0];
        assert_eq!(a.stop, Some(Stop::Gauge(0.5)));
        assert_eq!(a.notch, Some(Notch::Round { a: 4.0, r: 2.0 }));
        assert_eq!(s.result_path(a), Path::new("dir/a/a.pvd"));
        assert_eq!(s.result_path(&s.specimens[1]), Path::new("/abs/b"));
        assert_eq!(a.fields.stress.as_deref(), Some("stress_ip"));
        assert_eq!(a.gauge_measured(), Some(0.5));
    }

    #[test]
    fn unknown_keys_name_the_key_and_line() {
        let text = GOOD.replace("kind = \"plate\"", "kind = \"plate\"\ncolour = 3");
        let e = Study::parse(&text, Path::new("s.toml"))
            .unwrap_err()
            .to_string();
        assert!(e.contains("colour") && e.contains("line 23"), "{e}");
    }

    #[test]
    fn invalid_entries() {
        let cases = [
            (
                "stop = { gauge = 0.5 }",
                "stop = { gauge = 0.5, time = 1.0 }",
                "exactly one",
            ),
            ("kind = \"round-bar\"", "kind = \"bar\"", "not one of"),
            (
                "at = \"near:0,0,0\"",
                "at = \"near:0,0\"",
                "at: invalid selector",
            ),
            (
                "notch = { a = 4.0, R = 2.0 }",
                "notch = { R = 2.0 }",
                "notch needs",
            ),
            ("name = \"b\"", "name = \"a\"", "used twice"),
        ];
        for (from, to, needle) in cases {
            let text = GOOD.replacen(from, to, 1);
            let e = Study::parse(&text, Path::new("s.toml"))
                .unwrap_err()
                .to_string();
            assert!(e.contains(needle), "{to}: {e}");
        }
    }
}
