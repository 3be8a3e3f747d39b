//! The page shell every printable report shares: inline CSS, no scripts, fonts or outside
//! links, printing on A4 and Letter; and the escaping every page uses. The shell's style is
//! the approval sheet's, so pages from different commands look alike when they are filed
//! together.

use crate::report::Severity;

/// A sentence for HTML: escaped, with `names` set as code.
pub fn prose(s: &str) -> String {
    let mut out = String::new();
    for (i, part) in esc(s).split('`').enumerate() {
        if i % 2 == 1 {
            out.push_str("<code>");
            out.push_str(part);
            out.push_str("</code>");
        } else {
            out.push_str(part);
        }
    }
    // An unmatched backtick opened a code span that never closed: close it.
    if esc(s).matches('`').count() % 2 == 1 {
        out.push_str("</code>");
    }
    out
}

/// Escapes text for HTML.
pub fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// The style every page shares. Widths are in millimetres so that a page laid out for the
/// screen prints on A4 (210 mm) and Letter (216 mm) with the same margins.
pub const BASE_STYLE: &str = r#"
@page { margin: 14mm; }
* { box-sizing: border-box; }
body { font-family: "Helvetica Neue", Arial, sans-serif; font-size: 10.5pt; color: #111; margin: 0 auto; max-width: 180mm; padding: 8mm 0; }
h1 { font-size: 15pt; margin: 0 0 4pt; }
h2 { font-size: 12pt; margin: 14pt 0 4pt; border-bottom: 1px solid #888; }
p, li { line-height: 1.35; }
table { border-collapse: collapse; width: 100%; margin: 4pt 0; }
th, td { border: 1px solid #999; padding: 3pt 4pt; vertical-align: top; text-align: left; font-size: 9pt; }
th { background: #eee; }
td.num { text-align: right; white-space: nowrap; } th.num { text-align: right; }
tr { page-break-inside: avoid; }
.verdict { font-weight: bold; font-size: 13pt; padding: 4pt 8pt; display: inline-block; border: 2px solid #111; }
.stop { background: #f6d5d5; } .review { background: #f8ecc8; } .clear { background: #dcefd9; }
.small { font-size: 8.5pt; color: #333; }
@media print { body { padding: 0; max-width: none; } h2 { page-break-after: avoid; } }
"#;

/// One whole page: `extra_style` is added after the shared style.
pub fn page(title: &str, extra_style: &str, body: &str) -> String {
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>{}</title>\n<style>{BASE_STYLE}{extra_style}</style>\n</head>\n<body>\n{body}</body>\n</html>\n",
        esc(title)
    )
}

/// The CSS class that colours a verdict.
pub fn severity_class(s: Severity) -> &'static str {
    match s {
        Severity::Stop => "stop",
        Severity::Review => "review",
        Severity::Clear | Severity::Info => "clear",
    }
}

/// The verdict as a coloured badge.
pub fn verdict_badge(s: Severity) -> String {
    format!(
        "<p><span class=\"verdict {}\">Verdict: {}</span></p>\n",
        severity_class(s),
        s.word().to_uppercase()
    )
}
