//! Rich display helpers: small HTML tables for Jupyter (`_repr_html_`).

/// Escape text for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;")
}

/// A two-column key/value table with a title.
pub fn key_value_table(title: &str, rows: &[(&str, String)]) -> String {
    let mut out = format!(
        "<div class=\"specwell\"><strong>{}</strong><table><tbody>",
        escape(title)
    );
    for (k, v) in rows {
        out.push_str(&format!("<tr><th style=\"text-align:left\">{}</th><td style=\"text-align:left\">{}</td></tr>", escape(k), escape(v)));
    }
    out.push_str("</tbody></table></div>");
    out
}

/// A table with a header row; at most `max_rows` rows are shown (the rest summarised).
pub fn table(title: &str, header: &[String], rows: &[Vec<String>], max_rows: usize) -> String {
    let mut out = format!("<div class=\"specwell\"><strong>{}</strong><table><thead><tr>", escape(title));
    for h in header {
        out.push_str(&format!("<th>{}</th>", escape(h)));
    }
    out.push_str("</tr></thead><tbody>");
    for r in rows.iter().take(max_rows) {
        out.push_str("<tr>");
        for c in r {
            out.push_str(&format!("<td style=\"text-align:right\">{}</td>", escape(c)));
        }
        out.push_str("</tr>");
    }
    if rows.len() > max_rows {
        out.push_str(&format!("<tr><td colspan=\"{}\">… {} more rows</td></tr>", header.len(), rows.len() - max_rows));
    }
    out.push_str("</tbody></table></div>");
    out
}

/// Unit suffix " (meV)" or "" for natural units.
pub fn unit_suffix(symbol: &str) -> String {
    if symbol.is_empty() {
        String::new()
    } else {
        format!(" ({symbol})")
    }
}

/// `value` in fixed point with as many decimals as its uncertainty `err` supports
/// (one guard digit), between 2 and 12.
pub fn fixed_to(value: f64, err: f64) -> String {
    let d = if err.is_finite() && err > 0.0 { (1.0 - err.log10()).ceil().clamp(2.0, 12.0) as usize } else { 12 };
    format!("{value:.d$}")
}
