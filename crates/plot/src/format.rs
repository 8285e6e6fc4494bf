//! Number formatting shared by chart labels and the report: significant digits, no `-0`,
//! undefined values as an em dash.

/// The text shown for an undefined or non-finite value.
pub const UNDEFINED: &str = "—";

/// `v` to `digits` significant digits (1–15), plain notation for 10⁻³ ≤ |v| < 10⁵ and
/// scientific (`1.23e-5`) outside; trailing zeros kept so a column reads at one precision.
/// Non-finite values give [`UNDEFINED`]; `-0` prints as `0`.
pub fn significant(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return UNDEFINED.to_string();
    }
    let digits = digits.clamp(1, 15);
    if v == 0.0 {
        return if digits > 1 {
            format!("{:.*}", digits - 1, 0.0)
        } else {
            "0".to_string()
        };
    }
    let magnitude = v.abs().log10().floor();
    let text = if (-3.0..5.0).contains(&magnitude) {
        // Round first: 9.996 to 3 digits is 10.0, one decimal fewer.
        let decimals = (digits as f64 - 1.0 - magnitude).max(0.0) as usize;
        let rounded = format!("{v:.decimals$}");
        let back: f64 = rounded.parse().unwrap_or(v);
        let m2 = back.abs().log10().floor();
        if back != 0.0 && m2 > magnitude {
            let decimals = (digits as f64 - 1.0 - m2).max(0.0) as usize;
            format!("{v:.decimals$}")
        } else {
            rounded
        }
    } else {
        format!("{v:.*e}", digits - 1)
    };
    strip_negative_zero(text)
}

/// [`significant`] of an optional value; `None` gives [`UNDEFINED`].
pub fn significant_opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| UNDEFINED.to_string(), |v| significant(v, digits))
}

/// `v` with `decimals` decimals (0–12); non-finite gives [`UNDEFINED`], `-0.00` prints as `0.00`.
pub fn fixed(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return UNDEFINED.to_string();
    }
    let decimals = decimals.min(12);
    strip_negative_zero(format!("{v:.decimals$}"))
}

/// A tick-label formatter for an axis spanning `span`: enough decimals to tell ticks about
/// a tenth of the span apart, trailing zeros trimmed.
pub(crate) fn tick(v: f64, span: f64) -> String {
    if !v.is_finite() {
        return String::new();
    }
    let span = if span.is_finite() && span > 0.0 {
        span
    } else {
        1.0
    };
    if !(1e-4..1e5).contains(&span) {
        return significant(v, 3);
    }
    let decimals = (2.0 - span.log10().floor()).clamp(0.0, 8.0) as usize;
    let mut s = format!("{v:.decimals$}");
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    strip_negative_zero(s)
}

fn strip_negative_zero(s: String) -> String {
    match s.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| matches!(c, '0' | '.')) => rest.to_string(),
        Some(rest)
            if rest.contains('e')
                && rest
                    .split('e')
                    .next()
                    .is_some_and(|m| m.chars().all(|c| matches!(c, '0' | '.'))) =>
        {
            rest.to_string()
        }
        _ => s,
    }
}

/// `s` with the five HTML/XML special characters escaped (`& < > " '`).
pub fn escape_html(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits() {
        assert_eq!(significant(0.62345, 3), "0.623");
        assert_eq!(significant(1.2345, 3), "1.23");
        assert_eq!(significant(-0.012345, 3), "-0.0123");
        assert_eq!(significant(123.45, 3), "123");
        assert_eq!(significant(9.996, 3), "10.0");
        assert_eq!(significant(0.0, 3), "0.00");
        assert_eq!(significant(-0.0, 3), "0.00");
        assert_eq!(significant(-0.0001, 2), "-1.0e-4");
        assert_eq!(significant(123456.0, 3), "1.23e5");
        assert_eq!(significant(f64::NAN, 3), UNDEFINED);
        assert_eq!(significant_opt(None, 3), UNDEFINED);
        assert_eq!(significant(-0.0004, 1), "-4e-4");
    }

    #[test]
    fn fixed_and_ticks() {
        assert_eq!(fixed(-0.001, 2), "0.00");
        assert_eq!(fixed(37.4251, 2), "37.43");
        assert_eq!(fixed(f64::INFINITY, 2), UNDEFINED);
        assert_eq!(tick(0.25, 2.5), "0.25");
        assert_eq!(tick(-1.0, 2.5), "-1");
        assert_eq!(tick(-0.0, 2.5), "0");
        assert_eq!(tick(12.5, 40.0), "12.5");
    }

    #[test]
    fn escaping() {
        assert_eq!(
            escape_html(r#"<a href="x">&'</a>"#),
            "&lt;a href=&quot;x&quot;&gt;&amp;&#39;&lt;/a&gt;"
        );
    }
}
