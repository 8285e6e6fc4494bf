//! Which arrays of a result serve as stress, equivalent plastic strain and displacement.
//!
//! Detection is the reader's ([`ductrace_vtk::roles`]); this module applies the user's
//! overrides and the rules of the job on top:
//!
//! * stress has 6 or 9 components; its component order is, in this priority, the user's
//!   `--stress-order`, the order spelled by the array's component names (`XX, YY, ...`,
//!   `SXX, ...`, `S11, ...`), or VTK's symmetric order;
//! * the equivalent plastic strain lives where the stress lives (both point or both cell
//!   data); without one, a plastic strain tensor at the same location serves, accumulated
//!   increment by increment;
//! * displacement is point data with 3 components.

use std::path::Path;

use ductrace_tensor::{Component, ComponentOrder, strain::Shear};
use ductrace_vtk::roles::{self, RoleOverrides};
use ductrace_vtk::{FieldInfo, Location, Series};

use crate::{Result, TrackError};

/// The user's choices of arrays and conventions (command-line options or study keys).
#[derive(Debug, Clone, Default)]
pub struct FieldOptions {
    /// `--stress NAME`.
    pub stress: Option<String>,
    /// `--stress-order ORDER`.
    pub stress_order: Option<ComponentOrder>,
    /// `--eqps NAME`.
    pub eqps: Option<String>,
    /// `--plastic-strain NAME`.
    pub plastic_strain: Option<String>,
    /// `--displacement NAME`.
    pub displacement: Option<String>,
    /// Use point or cell data when the stress exists at both.
    pub location: Option<Location>,
    /// The plastic strain tensor stores engineering shears (γ = 2ε).
    pub engineering_shear: bool,
    /// The files carry deformed coordinates: subtract the displacement for the reference.
    pub deformed_points: bool,
    /// Skip non-finite stress and eqps values in full-field scans instead of refusing them.
    pub allow_nonfinite: bool,
}

/// Where the component order of the stress came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OrderSource {
    /// Given by the user.
    Option,
    /// Read from the array's component names.
    ComponentNames,
    /// VTK's symmetric order, by default.
    Default,
    /// A 9-component tensor: row-major, no order needed.
    Full,
}

impl OrderSource {
    /// A phrase for reports.
    pub fn describe(self) -> &'static str {
        match self {
            OrderSource::Option => "as given by the stress-order option",
            OrderSource::ComponentNames => "from the array's component names",
            OrderSource::Default => "VTK's symmetric order XX,YY,ZZ,XY,YZ,XZ (default)",
            OrderSource::Full => "9 components, row-major",
        }
    }
}

/// How the equivalent plastic strain is obtained.
#[derive(Debug, Clone, PartialEq)]
pub enum EqpsSource {
    /// A scalar array.
    Scalar(String),
    /// Accumulated from a plastic strain tensor: Δε̄p = √(2/3 Δεp:Δεp) per increment.
    Accumulated {
        /// Tensor array name.
        name: String,
        /// Its components (6 or 9).
        components: usize,
        /// Order of 6 components.
        order: ComponentOrder,
        /// Shear convention.
        shear: Shear,
    },
}

impl EqpsSource {
    /// A phrase for reports.
    pub fn describe(&self) -> String {
        match self {
            EqpsSource::Scalar(n) => format!("array {n}"),
            EqpsSource::Accumulated { name, shear, .. } => format!(
                "accumulated from the plastic strain tensor {name} ({} shear components)",
                match shear {
                    Shear::Tensor => "tensor",
                    Shear::Engineering => "engineering",
                }
            ),
        }
    }
}

/// The arrays a history uses.
#[derive(Debug, Clone)]
pub struct Fields {
    /// Stress array name.
    pub stress: String,
    /// Stress location (also the location of eqps and of the tracked entity).
    pub location: Location,
    /// Stress components (6 or 9).
    pub stress_components: usize,
    /// Component order of a 6-component stress.
    pub stress_order: ComponentOrder,
    /// Where the order came from.
    pub order_source: OrderSource,
    /// Equivalent plastic strain.
    pub eqps: Option<EqpsSource>,
    /// Displacement array name (point data, 3 components).
    pub displacement: Option<String>,
}

fn field_error(path: &Path, message: String) -> TrackError {
    TrackError::Field {
        path: path.to_path_buf(),
        message,
    }
}

/// A list of the arrays of a series, for messages: `stress (cell, 6), eqps (point, 1)`.
pub fn list_arrays(fields: &[FieldInfo]) -> String {
    if fields.is_empty() {
        return "the file has no arrays".to_string();
    }
    let items: Vec<String> = fields
        .iter()
        .map(|f| format!("{} ({}, {})", f.name, f.location, f.components))
        .collect();
    format!("arrays: {}", items.join(", "))
}

/// Reads a component order from component names such as `XX`, `SXX`, `S11`, `sigma_xy`:
/// the last two characters of each name, letters or digits. `None` unless all six names
/// parse and form a permutation.
pub fn order_from_names(names: &[String]) -> Option<ComponentOrder> {
    if names.len() != 6 {
        return None;
    }
    let mut comps = [Component::Xx; 6];
    for (slot, name) in comps.iter_mut().zip(names) {
        let clean: Vec<char> = name.chars().filter(|c| c.is_ascii_alphanumeric()).collect();
        if clean.len() < 2 {
            return None;
        }
        let tail: String = clean[clean.len() - 2..].iter().collect();
        *slot = Component::parse(&tail)?;
    }
    ComponentOrder::new(comps).ok()
}

fn find<'a>(series: &'a Series, name: &str, location: Option<Location>) -> Result<&'a FieldInfo> {
    series.field(name, location).map_err(|_| {
        let at = match location {
            Some(l) => format!(" as {l} data"),
            None => String::new(),
        };
        field_error(
            series.path(),
            format!(
                "no array named {name:?}{at}; {}",
                list_arrays(series.fields())
            ),
        )
    })
}

/// Resolves the arrays for a history from the catalogue and the user's options.
///
/// `need_eqps` and `need_displacement` say which roles the job needs; a needed role that
/// cannot be found is an error that lists the arrays and the option that would name one.
pub fn resolve(
    series: &Series,
    options: &FieldOptions,
    need_eqps: bool,
    need_displacement: bool,
) -> Result<Fields> {
    let path = series.path();
    let overrides = RoleOverrides {
        stress: options.stress.clone(),
        eqps: options.eqps.clone(),
        plastic_strain: options.plastic_strain.clone(),
        displacement: options.displacement.clone(),
    };
    // The reader's role errors name no file: put the result in front.
    let detected =
        roles::detect(series.fields(), &overrides).map_err(|e| field_error(path, e.to_string()))?;

    // Stress.
    let stress_ref = detected.stress.ok_or_else(|| {
        field_error(
            path,
            format!(
                "no stress array found; name one with --stress NAME ({})",
                list_arrays(series.fields())
            ),
        )
    })?;
    let location = options.location.unwrap_or(stress_ref.location);
    let stress = find(series, &stress_ref.name, Some(location))?;
    if stress.components != 6 && stress.components != 9 {
        let hint = if stress.components == 3 || stress.components == 4 {
            ": a 2-D model's stress must carry its out-of-plane component (the hoop stress of an \
             axisymmetric model, σ_zz of a plane-strain one); it is never assumed zero"
        } else {
            ""
        };
        return Err(field_error(
            path,
            format!(
                "stress array {:?} has {} components, expected 6 or 9{hint}",
                stress.name, stress.components
            ),
        ));
    }
    let (stress_order, order_source) = if stress.components == 9 {
        (ComponentOrder::VTK, OrderSource::Full)
    } else if let Some(o) = options.stress_order {
        (o, OrderSource::Option)
    } else if let Some(o) = order_from_names(&stress.component_names) {
        (o, OrderSource::ComponentNames)
    } else {
        (ComponentOrder::VTK, OrderSource::Default)
    };

    // Equivalent plastic strain, at the stress location.
    let eqps = if let Some(r) = &detected.eqps {
        let f = series.field(&r.name, Some(location)).map_err(|_| {
            field_error(
                path,
                format!(
                    "equivalent plastic strain {:?} is {} data but the stress {:?} is {location} data; \
                     use --eqps NAME for a {location} array or choose the location",
                    r.name, r.location, stress.name
                ),
            )
        })?;
        if f.components != 1 {
            return Err(field_error(
                path,
                format!(
                    "equivalent plastic strain {:?} has {} components, expected 1",
                    f.name, f.components
                ),
            ));
        }
        Some(EqpsSource::Scalar(f.name.clone()))
    } else if let Some(r) = &detected.plastic_strain {
        let f = find(series, &r.name, Some(location))?;
        if f.components != 6 && f.components != 9 {
            return Err(field_error(
                path,
                format!(
                    "plastic strain {:?} has {} components, expected 6 or 9",
                    f.name, f.components
                ),
            ));
        }
        let order = order_from_names(&f.component_names).unwrap_or(ComponentOrder::VTK);
        Some(EqpsSource::Accumulated {
            name: f.name.clone(),
            components: f.components,
            order,
            shear: if options.engineering_shear {
                Shear::Engineering
            } else {
                Shear::Tensor
            },
        })
    } else {
        None
    };
    if need_eqps && eqps.is_none() {
        return Err(field_error(
            path,
            format!(
                "no equivalent plastic strain: name a scalar array with --eqps NAME, or a plastic \
                 strain tensor with --plastic-strain NAME to accumulate it from ({})",
                list_arrays(series.fields())
            ),
        ));
    }

    // Displacement (point data, 3 components).
    let displacement = match &detected.displacement {
        Some(r) => {
            let f = find(series, &r.name, Some(Location::Point))?;
            if f.components != 3 {
                return Err(field_error(
                    path,
                    format!(
                        "displacement {:?} has {} components, expected 3",
                        f.name, f.components
                    ),
                ));
            }
            Some(f.name.clone())
        }
        None => None,
    };
    if (need_displacement || options.deformed_points) && displacement.is_none() {
        return Err(field_error(
            path,
            format!(
                "no displacement array (point data, 3 components) for the gauge; name one with \
                 --displacement NAME ({})",
                list_arrays(series.fields())
            ),
        ));
    }

    Ok(Fields {
        stress: stress.name.clone(),
        location,
        stress_components: stress.components,
        stress_order,
        order_source,
        eqps,
        displacement,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(v: &[&str]) -> Vec<String> {
        v.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn orders_from_component_names() {
        let o = order_from_names(&names(&["XX", "YY", "ZZ", "XY", "YZ", "XZ"])).unwrap();
        assert!(o.is_vtk());
        let o = order_from_names(&names(&["S11", "S22", "S33", "S23", "S13", "S12"])).unwrap();
        assert_eq!(o, ComponentOrder::VOIGT);
        let o = order_from_names(&names(&["sxx", "syy", "szz", "sxy", "syz", "szx"])).unwrap();
        assert!(o.is_vtk());
        assert!(order_from_names(&names(&["0", "1", "2", "3", "4", "5"])).is_none());
        assert!(order_from_names(&names(&["XX", "XX", "ZZ", "XY", "YZ", "XZ"])).is_none());
        assert!(order_from_names(&names(&["XX"])).is_none());
    }
}
