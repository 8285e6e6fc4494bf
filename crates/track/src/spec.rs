//! The small languages of the command line and the study file: selectors, stops, gauges.
//!
//! * Selector (`--at`): `cell:ID`, `point:ID` (0-based ids as stored, after the reader's piece
//!   merge), `near:X,Y,Z` (nearest point or cell centroid in the reference configuration),
//!   `max:FIELD` (largest value of a scalar array, or of `eqps`, `triaxiality`, `sigma_vm`).
//! * Stop (`--until`): `increment:N`, `time:T`, `eqps:E`, `gauge:U`.
//! * Gauge (`--gauge`): `X1,Y1,Z1:X2,Y2,Z2` (change of distance between two material points) or
//!   `X,Y,Z/AXIS` with AXIS one of `x`, `y`, `z` (that displacement component of one point).

use std::fmt;
use std::str::FromStr;

use crate::TrackError;

/// Which point or cell to follow.
#[derive(Debug, Clone, PartialEq)]
pub enum Selector {
    /// A cell by 0-based id.
    Cell(usize),
    /// A point by 0-based id.
    Point(usize),
    /// The point or cell centroid nearest these reference coordinates.
    Near([f64; 3]),
    /// Where this field is largest at the stop (ties to the lowest id).
    Max(String),
}

/// When the history ends: the fracture instant of the test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Stop {
    /// At an increment index (0-based).
    Increment(usize),
    /// At a time.
    Time(f64),
    /// When the equivalent plastic strain at the point reaches a value.
    Eqps(f64),
    /// When the gauge signal reaches a value.
    Gauge(f64),
}

/// A coordinate axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Axis {
    /// x, component 0.
    X,
    /// y, component 1.
    Y,
    /// z, component 2.
    Z,
}

impl Axis {
    /// Component index.
    pub fn index(self) -> usize {
        match self {
            Axis::X => 0,
            Axis::Y => 1,
            Axis::Z => 2,
        }
    }
}

/// The simulated counterpart of the test's extensometer.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GaugeSpec {
    /// Change of the distance between the material points nearest these two positions.
    Distance([f64; 3], [f64; 3]),
    /// One displacement component of the material point nearest this position.
    Component([f64; 3], Axis),
}

fn syntax(what: &'static str, given: &str, reason: impl Into<String>) -> TrackError {
    TrackError::Syntax {
        what,
        given: given.to_string(),
        reason: reason.into(),
    }
}

fn parse_f64(what: &'static str, given: &str, t: &str) -> Result<f64, TrackError> {
    let v: f64 = t
        .trim()
        .parse()
        .map_err(|_| syntax(what, given, format!("{:?} is not a number", t.trim())))?;
    if !v.is_finite() {
        return Err(syntax(what, given, format!("{:?} is not finite", t.trim())));
    }
    Ok(v)
}

fn parse_xyz(what: &'static str, given: &str, t: &str) -> Result<[f64; 3], TrackError> {
    let parts: Vec<&str> = t.split(',').collect();
    if parts.len() != 3 {
        return Err(syntax(
            what,
            given,
            format!("expected three coordinates X,Y,Z, got {}", parts.len()),
        ));
    }
    Ok([
        parse_f64(what, given, parts[0])?,
        parse_f64(what, given, parts[1])?,
        parse_f64(what, given, parts[2])?,
    ])
}

fn parse_id(what: &'static str, given: &str, t: &str) -> Result<usize, TrackError> {
    t.trim().parse().map_err(|_| {
        syntax(
            what,
            given,
            format!("{:?} is not a non-negative integer id", t.trim()),
        )
    })
}

impl FromStr for Selector {
    type Err = TrackError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        const FORMS: &str = "use cell:ID, point:ID, near:X,Y,Z or max:FIELD";
        let (kind, rest) = s
            .split_once(':')
            .ok_or_else(|| syntax("selector", s, FORMS))?;
        match kind.trim() {
            "cell" => Ok(Selector::Cell(parse_id("selector", s, rest)?)),
            "point" => Ok(Selector::Point(parse_id("selector", s, rest)?)),
            "near" => Ok(Selector::Near(parse_xyz("selector", s, rest)?)),
            "max" if !rest.trim().is_empty() => Ok(Selector::Max(rest.trim().to_string())),
            "max" => Err(syntax(
                "selector",
                s,
                "max: needs a field name, e.g. max:eqps",
            )),
            other => Err(syntax(
                "selector",
                s,
                format!("unknown kind {other:?}; {FORMS}"),
            )),
        }
    }
}

impl FromStr for Stop {
    type Err = TrackError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        const FORMS: &str = "use increment:N, time:T, eqps:E or gauge:U";
        let (kind, rest) = s.split_once(':').ok_or_else(|| syntax("stop", s, FORMS))?;
        match kind.trim() {
            "increment" => Ok(Stop::Increment(parse_id("stop", s, rest)?)),
            "time" => Ok(Stop::Time(parse_f64("stop", s, rest)?)),
            "eqps" => Ok(Stop::Eqps(parse_f64("stop", s, rest)?)),
            "gauge" => Ok(Stop::Gauge(parse_f64("stop", s, rest)?)),
            other => Err(syntax(
                "stop",
                s,
                format!("unknown kind {other:?}; {FORMS}"),
            )),
        }
    }
}

impl FromStr for GaugeSpec {
    type Err = TrackError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        if let Some((a, b)) = s.split_once(':') {
            return Ok(GaugeSpec::Distance(
                parse_xyz("gauge", s, a)?,
                parse_xyz("gauge", s, b)?,
            ));
        }
        if let Some((p, axis)) = s.split_once('/') {
            let axis = match axis.trim() {
                "x" | "X" => Axis::X,
                "y" | "Y" => Axis::Y,
                "z" | "Z" => Axis::Z,
                other => {
                    return Err(syntax(
                        "gauge",
                        s,
                        format!("axis {other:?} is not one of x, y, z"),
                    ));
                }
            };
            return Ok(GaugeSpec::Component(parse_xyz("gauge", s, p)?, axis));
        }
        Err(syntax(
            "gauge",
            s,
            "use X1,Y1,Z1:X2,Y2,Z2 (distance change) or X,Y,Z/AXIS (a displacement component)",
        ))
    }
}

impl fmt::Display for Selector {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Selector::Cell(i) => write!(f, "cell:{i}"),
            Selector::Point(i) => write!(f, "point:{i}"),
            Selector::Near([x, y, z]) => write!(f, "near:{x},{y},{z}"),
            Selector::Max(name) => write!(f, "max:{name}"),
        }
    }
}

impl fmt::Display for Stop {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Stop::Increment(i) => write!(f, "increment:{i}"),
            Stop::Time(t) => write!(f, "time:{t}"),
            Stop::Eqps(e) => write!(f, "eqps:{e}"),
            Stop::Gauge(u) => write!(f, "gauge:{u}"),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn selectors() {
        assert_eq!("cell:12".parse::<Selector>().unwrap(), Selector::Cell(12));
        assert_eq!("point:0".parse::<Selector>().unwrap(), Selector::Point(0));
        assert_eq!(
            "near:0,-1.5,2e-3".parse::<Selector>().unwrap(),
            Selector::Near([0.0, -1.5, 2e-3])
        );
        assert_eq!(
            "max:eqps".parse::<Selector>().unwrap(),
            Selector::Max("eqps".into())
        );
        for bad in [
            "cell:-1",
            "cell:x",
            "near:1,2",
            "max:",
            "edge:3",
            "12",
            "near:1,2,nan",
        ] {
            let e = bad.parse::<Selector>().unwrap_err().to_string();
            assert!(e.contains("invalid selector"), "{bad}: {e}");
        }
    }

    #[test]
    fn stops_and_gauges() {
        assert_eq!("gauge:0.83".parse::<Stop>().unwrap(), Stop::Gauge(0.83));
        assert_eq!("increment:7".parse::<Stop>().unwrap(), Stop::Increment(7));
        assert_eq!("time:1.5".parse::<Stop>().unwrap(), Stop::Time(1.5));
        assert_eq!("eqps:0.4".parse::<Stop>().unwrap(), Stop::Eqps(0.4));
        assert!("strain:1".parse::<Stop>().is_err());
        assert_eq!(
            "0,-12.5,0:0,12.5,0".parse::<GaugeSpec>().unwrap(),
            GaugeSpec::Distance([0.0, -12.5, 0.0], [0.0, 12.5, 0.0])
        );
        assert_eq!(
            "1,2,3/y".parse::<GaugeSpec>().unwrap(),
            GaugeSpec::Component([1.0, 2.0, 3.0], Axis::Y)
        );
        assert!("1,2,3/w".parse::<GaugeSpec>().is_err());
        assert!("1,2,3".parse::<GaugeSpec>().is_err());
    }

    #[test]
    fn display_round_trips() {
        for s in ["cell:3", "point:9", "max:damage", "near:1,2,3"] {
            assert_eq!(s.parse::<Selector>().unwrap().to_string(), s);
        }
        for s in ["increment:4", "time:0.5", "eqps:0.3", "gauge:1.25"] {
            assert_eq!(s.parse::<Stop>().unwrap().to_string(), s);
        }
    }
}
