//! Named orders of the six independent components of a symmetric tensor.
//!
//! Solvers disagree on how they lay out a symmetric tensor in six numbers. VTK's own
//! symmetric order is `XX, YY, ZZ, XY, YZ, XZ` (VTK file-format documentation; see
//! FIELD-NOTES §7); Voigt's is `xx, yy, zz, yz, xz, xy`; others put `xy` fourth and `xz`
//! fifth. A [`ComponentOrder`] names the order explicitly so a reader can map any of them.

use std::fmt;
use std::str::FromStr;

use crate::TensorError;

/// One independent component of a symmetric 3×3 tensor.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Component {
    /// Normal component along x.
    Xx,
    /// Normal component along y.
    Yy,
    /// Normal component along z.
    Zz,
    /// Shear component in the x–y plane.
    Xy,
    /// Shear component in the y–z plane.
    Yz,
    /// Shear component in the x–z plane.
    Xz,
}

impl Component {
    /// All six, in VTK's symmetric order.
    pub const ALL: [Component; 6] = [
        Component::Xx,
        Component::Yy,
        Component::Zz,
        Component::Xy,
        Component::Yz,
        Component::Xz,
    ];

    /// Lower-case label, e.g. `"xz"`.
    pub fn label(self) -> &'static str {
        match self {
            Component::Xx => "xx",
            Component::Yy => "yy",
            Component::Zz => "zz",
            Component::Xy => "xy",
            Component::Yz => "yz",
            Component::Xz => "xz",
        }
    }

    /// Parses a label, case-insensitive; `yx`, `zy`, `zx` name the same shear components
    /// as `xy`, `yz`, `xz`. Separators such as `_` or a leading `s` (`sxx`) are not accepted here.
    pub fn parse(text: &str) -> Option<Component> {
        match text.trim().to_ascii_lowercase().as_str() {
            "xx" | "11" => Some(Component::Xx),
            "yy" | "22" => Some(Component::Yy),
            "zz" | "33" => Some(Component::Zz),
            "xy" | "yx" | "12" | "21" => Some(Component::Xy),
            "yz" | "zy" | "23" | "32" => Some(Component::Yz),
            "xz" | "zx" | "13" | "31" => Some(Component::Xz),
            _ => None,
        }
    }

    /// Position of this component in VTK's symmetric order (0..6).
    pub fn vtk_index(self) -> usize {
        match self {
            Component::Xx => 0,
            Component::Yy => 1,
            Component::Zz => 2,
            Component::Xy => 3,
            Component::Yz => 4,
            Component::Xz => 5,
        }
    }
}

/// A permutation of the six components: position `i` of an input tuple holds `self.0[i]`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct ComponentOrder([Component; 6]);

impl ComponentOrder {
    /// VTK's symmetric order `XX, YY, ZZ, XY, YZ, XZ` (VTK file formats; FIELD-NOTES §7).
    pub const VTK: ComponentOrder = ComponentOrder(Component::ALL);

    /// Voigt's order `xx, yy, zz, yz, xz, xy` (common practice in continuum mechanics texts).
    pub const VOIGT: ComponentOrder = ComponentOrder([
        Component::Xx,
        Component::Yy,
        Component::Zz,
        Component::Yz,
        Component::Xz,
        Component::Xy,
    ]);

    /// Builds an order from six components; each must appear exactly once.
    pub fn new(components: [Component; 6]) -> Result<ComponentOrder, TensorError> {
        for c in Component::ALL {
            let n = components.iter().filter(|&&x| x == c).count();
            if n != 1 {
                let text = components
                    .iter()
                    .map(|c| c.label())
                    .collect::<Vec<_>>()
                    .join(",");
                return Err(TensorError::BadOrder {
                    given: text,
                    reason: format!("component {} appears {n} times", c.label()),
                });
            }
        }
        Ok(ComponentOrder(components))
    }

    /// The components in input order.
    pub fn components(&self) -> [Component; 6] {
        self.0
    }

    /// Maps a tuple in this order to VTK's symmetric order.
    #[inline]
    pub fn to_vtk(&self, tuple: [f64; 6]) -> [f64; 6] {
        let mut out = [0.0; 6];
        for (value, c) in tuple.iter().zip(self.0) {
            out[c.vtk_index()] = *value;
        }
        out
    }

    /// True when this is VTK's own order (no permutation needed).
    pub fn is_vtk(&self) -> bool {
        *self == Self::VTK
    }
}

impl Default for ComponentOrder {
    fn default() -> Self {
        Self::VTK
    }
}

impl fmt::Display for ComponentOrder {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, c) in self.0.iter().enumerate() {
            if i > 0 {
                f.write_str(",")?;
            }
            f.write_str(c.label())?;
        }
        Ok(())
    }
}

impl FromStr for ComponentOrder {
    type Err = TensorError;

    /// Parses six comma-separated labels, e.g. `xx,yy,zz,yz,xz,xy`; `vtk` and `voigt`
    /// name the two usual orders.
    fn from_str(text: &str) -> Result<Self, Self::Err> {
        let lowered = text.trim().to_ascii_lowercase();
        match lowered.as_str() {
            "vtk" => return Ok(Self::VTK),
            "voigt" => return Ok(Self::VOIGT),
            _ => {}
        }
        let parts: Vec<&str> = lowered.split(',').collect();
        if parts.len() != 6 {
            return Err(TensorError::BadOrder {
                given: text.to_string(),
                reason: format!("expected 6 comma-separated labels, got {}", parts.len()),
            });
        }
        let mut comps = [Component::Xx; 6];
        for (slot, part) in comps.iter_mut().zip(&parts) {
            *slot = Component::parse(part).ok_or_else(|| TensorError::BadOrder {
                given: text.to_string(),
                reason: format!(
                    "unknown component {:?} (use xx, yy, zz, xy, yz, xz)",
                    part.trim()
                ),
            })?;
        }
        ComponentOrder::new(comps).map_err(|e| match e {
            TensorError::BadOrder { reason, .. } => TensorError::BadOrder {
                given: text.to_string(),
                reason,
            },
            other => other,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_voigt_and_maps_to_vtk() {
        let order: ComponentOrder = "xx,yy,zz,yz,xz,xy".parse().unwrap();
        assert_eq!(order, ComponentOrder::VOIGT);
        // Voigt tuple (1,2,3, yz=4, xz=5, xy=6) -> VTK (1,2,3, xy=6, yz=4, xz=5)
        assert_eq!(
            order.to_vtk([1.0, 2.0, 3.0, 4.0, 5.0, 6.0]),
            [1.0, 2.0, 3.0, 6.0, 4.0, 5.0]
        );
        assert_eq!(order.to_string(), "xx,yy,zz,yz,xz,xy");
    }

    #[test]
    fn accepts_case_and_synonyms() {
        let order: ComponentOrder = " XX,YY,ZZ,YX,ZY,ZX ".parse().unwrap();
        assert!(order.is_vtk());
        assert!("vtk".parse::<ComponentOrder>().unwrap().is_vtk());
    }

    #[test]
    fn rejects_repeats_unknowns_and_counts() {
        let e = "xx,yy,zz,xy,xy,xz".parse::<ComponentOrder>().unwrap_err();
        assert!(e.to_string().contains("xy appears 2 times"), "{e}");
        let e = "xx,yy,zz,xy,yz,qq".parse::<ComponentOrder>().unwrap_err();
        assert!(e.to_string().contains("unknown component \"qq\""), "{e}");
        let e = "xx,yy,zz".parse::<ComponentOrder>().unwrap_err();
        assert!(e.to_string().contains("got 3"), "{e}");
    }
}
