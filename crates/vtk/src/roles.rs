//! Detection of what arrays mean: stress, equivalent plastic strain, plastic strain tensor and
//! displacement, by generic names and component names, with user overrides.
//!
//! Rules (ductrace's own; the generic names are common practice in solver output):
//! - names are compared case-insensitively with `_`, `-`, `.` and spaces ignored;
//! - stress: `stress`, `sigma`, `s`, `cauchy_stress`; 6 or 9 components. A stress with 3 or 4
//!   components (a 2-D model's in-plane stress) is an **error**: the out-of-plane component is
//!   needed and is never taken as zero;
//! - eqps: `eqps`, `equivalent_plastic_strain`, `epbar`, `plastic_strain_equivalent`;
//!   1 component;
//! - plastic strain: `plastic_strain`, `pe`, `ep`; 6 or 9 components;
//! - displacement: `displacement`, `displacements`, `u`, `disp`; 3 components;
//! - an array also qualifies by its component names, e.g. `S11 S22 S33 S12 S23 S13` or
//!   `sigma_xx ...` for stress, `U1 U2 U3` or `disp_x ...` for displacement;
//! - an array present at both points and cells under one name: the **cell** array is taken
//!   (cell values are usually integration-point derived; point values are extrapolated and smear
//!   peaks);
//! - candidates of different names: [`Error::AmbiguousRole`] listing them — never a silent guess;
//! - an override naming a missing array: [`Error::UnknownOverride`] listing the arrays;
//! - nothing found: the role is `None`; the caller decides whether it needs it.
//!
//! Array names that match but have a component count unfit for the role (other than the 2-D
//! stress case) are not candidates.

use crate::error::Error;
use crate::{FieldInfo, Location};

/// Arrays named by the user for each role (command-line `--stress NAME` and the like).
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct RoleOverrides {
    /// Stress array name.
    pub stress: Option<String>,
    /// Equivalent plastic strain array name.
    pub eqps: Option<String>,
    /// Plastic strain tensor array name.
    pub plastic_strain: Option<String>,
    /// Displacement array name.
    pub displacement: Option<String>,
}

/// An array chosen for a role.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FieldRef {
    /// Array name.
    pub name: String,
    /// Its location.
    pub location: Location,
}

/// The arrays found for each role; `None` where nothing qualifies.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Roles {
    /// Cauchy stress, 6 (VTK order XX YY ZZ XY YZ XZ) or 9 components.
    pub stress: Option<FieldRef>,
    /// Equivalent plastic strain, scalar.
    pub eqps: Option<FieldRef>,
    /// Plastic strain tensor, 6 or 9 components.
    pub plastic_strain: Option<FieldRef>,
    /// Displacement, 3 components.
    pub displacement: Option<FieldRef>,
}

struct Role {
    name: &'static str,
    option: &'static str,
    generic: &'static [&'static str],
    counts: &'static [usize],
    /// component-name suffixes that identify the role, if any
    suffixes: &'static [&'static str],
}

const TENSOR_SUFFIXES: &[&str] = &[
    "xx", "yy", "zz", "xy", "yz", "xz", "zx", "yx", "zy", "11", "22", "33", "12", "23", "13", "31",
    "21", "32",
];
const VECTOR_SUFFIXES: &[&str] = &["x", "y", "z", "1", "2", "3"];

const STRESS: Role = Role {
    name: "stress",
    option: "stress",
    generic: &["stress", "sigma", "s", "cauchystress"],
    counts: &[6, 9],
    suffixes: TENSOR_SUFFIXES,
};
const EQPS: Role = Role {
    name: "equivalent plastic strain",
    option: "eqps",
    generic: &[
        "eqps",
        "equivalentplasticstrain",
        "epbar",
        "plasticstrainequivalent",
    ],
    counts: &[1],
    suffixes: &[],
};
const PLASTIC: Role = Role {
    name: "plastic strain",
    option: "plastic-strain",
    generic: &["plasticstrain", "pe", "ep"],
    counts: &[6, 9],
    suffixes: TENSOR_SUFFIXES,
};
const DISP: Role = Role {
    name: "displacement",
    option: "displacement",
    generic: &["displacement", "displacements", "u", "disp"],
    counts: &[3],
    suffixes: VECTOR_SUFFIXES,
};

/// Lower-case with `_`, `-`, `.` and spaces removed.
pub fn normalize(name: &str) -> String {
    name.chars()
        .filter(|c| !matches!(c, '_' | '-' | '.' | ' '))
        .flat_map(char::to_lowercase)
        .collect()
}

fn by_component_names(role: &Role, f: &FieldInfo) -> bool {
    if role.suffixes.is_empty() || f.component_names.is_empty() {
        return false;
    }
    f.component_names.iter().all(|c| {
        let n = normalize(c);
        role.suffixes.iter().any(|s| {
            n.strip_suffix(s)
                .is_some_and(|prefix| role.generic.contains(&prefix))
        })
    })
}

fn check_count(role: &Role, f: &FieldInfo) -> Result<bool, Error> {
    if role.counts.contains(&f.components) {
        return Ok(true);
    }
    if role.option == "stress" && (f.components == 3 || f.components == 4) {
        return Err(Error::BadRole {
            role: role.name,
            name: f.name.clone(),
            reason: if f.components == 3 {
                "it has 3 components, a 2-D stress without the out-of-plane component (hoop or \
                 plane-strain zz stress); that component is required and is never taken as zero"
                    .into()
            } else {
                "it has 4 components, a 2-D stress in no defined component order; write the full \
                 6-component tensor including the out-of-plane component"
                    .into()
            },
        });
    }
    Ok(false)
}

/// Picks the cell array of that name if there is one, else the point array.
fn pick<'a>(fields: &'a [FieldInfo], name: &str) -> Option<&'a FieldInfo> {
    fields
        .iter()
        .find(|f| f.name == name && f.location == Location::Cell)
        .or_else(|| fields.iter().find(|f| f.name == name))
}

fn list(fields: &[FieldInfo]) -> String {
    if fields.is_empty() {
        return "none".into();
    }
    fields
        .iter()
        .map(|f| format!("{} ({}, {})", f.name, f.location, f.components))
        .collect::<Vec<_>>()
        .join(", ")
}

fn detect_one(
    role: &Role,
    fields: &[FieldInfo],
    over: Option<&str>,
) -> Result<Option<FieldRef>, Error> {
    if let Some(name) = over {
        let f = pick(fields, name).ok_or_else(|| Error::UnknownOverride {
            role: role.name,
            name: name.to_string(),
            available: list(fields),
        })?;
        if !check_count(role, f)? {
            return Err(Error::BadRole {
                role: role.name,
                name: f.name.clone(),
                reason: format!(
                    "it has {} components, expected {}",
                    f.components,
                    role.counts
                        .iter()
                        .map(usize::to_string)
                        .collect::<Vec<_>>()
                        .join(" or ")
                ),
            });
        }
        return Ok(Some(FieldRef {
            name: f.name.clone(),
            location: f.location,
        }));
    }
    let mut names: Vec<&str> = Vec::new();
    for f in fields {
        let hit =
            role.generic.contains(&normalize(&f.name).as_str()) || by_component_names(role, f);
        if hit && !names.contains(&f.name.as_str()) {
            names.push(&f.name);
        }
    }
    let mut chosen: Vec<&FieldInfo> = Vec::new();
    for n in names {
        if let Some(f) = pick(fields, n)
            && check_count(role, f)?
        {
            chosen.push(f);
        }
    }
    match chosen.len() {
        0 => Ok(None),
        1 => Ok(Some(FieldRef {
            name: chosen[0].name.clone(),
            location: chosen[0].location,
        })),
        _ => Err(Error::AmbiguousRole {
            role: role.name,
            option: role.option,
            candidates: chosen
                .iter()
                .map(|f| format!("{} ({}, {})", f.name, f.location, f.components))
                .collect::<Vec<_>>()
                .join(", "),
        }),
    }
}

/// Detects the arrays playing each role in a field catalogue (see the module doc for the rules).
pub fn detect(fields: &[FieldInfo], overrides: &RoleOverrides) -> Result<Roles, Error> {
    Ok(Roles {
        stress: detect_one(&STRESS, fields, overrides.stress.as_deref())?,
        eqps: detect_one(&EQPS, fields, overrides.eqps.as_deref())?,
        plastic_strain: detect_one(&PLASTIC, fields, overrides.plastic_strain.as_deref())?,
        displacement: detect_one(&DISP, fields, overrides.displacement.as_deref())?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ScalarType;

    fn f(name: &str, loc: Location, comps: usize, cn: &[&str]) -> FieldInfo {
        FieldInfo {
            name: name.into(),
            location: loc,
            components: comps,
            component_names: cn.iter().map(|s| s.to_string()).collect(),
            scalar_type: ScalarType::Float64,
            encoding: String::new(),
        }
    }

    #[test]
    fn generic_names_and_cell_preference() {
        let fields = vec![
            f("Stress", Location::Point, 6, &[]),
            f("Stress", Location::Cell, 6, &[]),
            f("Equivalent_Plastic_Strain", Location::Cell, 1, &[]),
            f("U", Location::Point, 3, &[]),
            f("plastic-strain", Location::Cell, 9, &[]),
        ];
        let r = detect(&fields, &RoleOverrides::default()).unwrap();
        assert_eq!(
            r.stress,
            Some(FieldRef {
                name: "Stress".into(),
                location: Location::Cell
            })
        );
        assert_eq!(r.eqps.unwrap().name, "Equivalent_Plastic_Strain");
        assert_eq!(r.displacement.unwrap().location, Location::Point);
        assert_eq!(r.plastic_strain.unwrap().name, "plastic-strain");
    }

    #[test]
    fn ambiguous_lists_candidates() {
        let fields = vec![
            f("stress", Location::Cell, 6, &[]),
            f("sigma", Location::Cell, 6, &[]),
        ];
        let e = detect(&fields, &RoleOverrides::default())
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("stress (cell, 6)") && e.contains("sigma (cell, 6)"),
            "{e}"
        );
        assert!(e.contains("--stress"), "{e}");
        let o = RoleOverrides {
            stress: Some("sigma".into()),
            ..Default::default()
        };
        assert_eq!(detect(&fields, &o).unwrap().stress.unwrap().name, "sigma");
    }

    #[test]
    fn two_d_stress_without_out_of_plane_is_error() {
        let fields = vec![f("S", Location::Cell, 3, &[])];
        let e = detect(&fields, &RoleOverrides::default())
            .unwrap_err()
            .to_string();
        assert!(e.contains("out-of-plane"), "{e}");
        let fields = vec![f("S", Location::Cell, 4, &[])];
        assert!(detect(&fields, &RoleOverrides::default()).is_err());
    }

    #[test]
    fn override_missing_lists_arrays() {
        let fields = vec![f("temp", Location::Point, 1, &[])];
        let o = RoleOverrides {
            eqps: Some("nope".into()),
            ..Default::default()
        };
        let e = detect(&fields, &o).unwrap_err().to_string();
        assert!(e.contains("nope") && e.contains("temp (point, 1)"), "{e}");
    }

    #[test]
    fn component_names_identify() {
        let fields = vec![
            f(
                "field7",
                Location::Cell,
                6,
                &["S11", "S22", "S33", "S12", "S23", "S13"],
            ),
            f("f8", Location::Point, 3, &["U1", "U2", "U3"]),
            f("other", Location::Point, 3, &["X", "Y", "Z"]),
        ];
        let r = detect(&fields, &RoleOverrides::default()).unwrap();
        assert_eq!(r.stress.unwrap().name, "field7");
        assert_eq!(r.displacement.unwrap().name, "f8");
        assert!(r.eqps.is_none());
    }

    #[test]
    fn wrong_count_not_a_candidate() {
        let fields = vec![f("u", Location::Point, 1, &[])];
        assert!(
            detect(&fields, &RoleOverrides::default())
                .unwrap()
                .displacement
                .is_none()
        );
    }
}
