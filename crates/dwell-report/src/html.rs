//! A self-contained HTML report: one file with its CSS, its font and its charts inline, no
//! script and no reference to anything outside the file. Sections break onto new pages when
//! printed (A4 or Letter: the page size is left to the printer, margins fixed).

use dwell_charts::font::{FAMILY, FONT_TTF};

/// One section of a report.
#[derive(Clone, Debug)]
pub struct Section {
    /// Anchor id.
    pub id: String,
    /// Heading.
    pub heading: String,
    /// Body, already HTML (escape text with [`esc`]).
    pub body: String,
}

/// A report: title, a line under it, sections in order.
#[derive(Clone, Debug)]
pub struct Report {
    /// Title (text).
    pub title: String,
    /// Line under the title (text).
    pub subtitle: String,
    /// Sections.
    pub sections: Vec<Section>,
}

/// Escapes text for HTML and XML content and attributes.
pub fn esc(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            _ => o.push(c),
        }
    }
    o
}

/// Standard base64 (RFC 4648 §4) of `bytes`, for the inline font.
pub fn base64(bytes: &[u8]) -> String {
    const T: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut o = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for ch in bytes.chunks(3) {
        let b = [ch[0], *ch.get(1).unwrap_or(&0), *ch.get(2).unwrap_or(&0)];
        let n = (b[0] as u32) << 16 | (b[1] as u32) << 8 | b[2] as u32;
        for k in 0..4 {
            if k <= ch.len() {
                o.push(T[(n >> (18 - 6 * k) & 63) as usize] as char);
            } else {
                o.push('=');
            }
        }
    }
    o
}

/// A table: header cells and rows, all text; cells that parse as numbers align right.
pub fn table(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut o = String::from("<table>\n<thead><tr>");
    for h in header {
        o.push_str(&format!("<th>{}</th>", esc(h)));
    }
    o.push_str("</tr></thead>\n<tbody>\n");
    for r in rows {
        o.push_str("<tr>");
        for c in r {
            let numeric = c
                .trim_start_matches(['−', '-'])
                .chars()
                .next()
                .is_some_and(|ch| ch.is_ascii_digit());
            o.push_str(&format!(
                "<td{}>{}</td>",
                if numeric { " class=\"n\"" } else { "" },
                esc(c)
            ));
        }
        o.push_str("</tr>\n");
    }
    o.push_str("</tbody>\n</table>\n");
    o
}

/// A chart's SVG made ready to sit inside the page: no XML namespace URL (HTML needs none),
/// scaled to the page width, labelled for screen readers.
pub fn inline_svg(svg: &str, title: &str) -> String {
    let body = svg.replacen(" xmlns=\"http://www.w3.org/2000/svg\"", "", 1);
    let body = match body.find("<svg ") {
        Some(i) => {
            let rest = &body[i + 5..];
            let rest = strip_attr(&strip_attr(rest, "width"), "height");
            format!(
                "<svg class=\"chart\" role=\"img\" aria-label=\"{}\" {}",
                esc(title),
                rest
            )
        }
        None => body,
    };
    body
}

fn strip_attr(s: &str, name: &str) -> String {
    let key = format!("{name}=\"");
    let end_of_tag = s.find('>').unwrap_or(s.len());
    match s[..end_of_tag].find(&key) {
        Some(i) => {
            let after = &s[i + key.len()..];
            let close = after.find('"').map(|j| i + key.len() + j + 1).unwrap_or(i);
            format!("{}{}", &s[..i], s[close..].trim_start())
        }
        None => s.to_string(),
    }
}

const CSS: &str = r#"
:root { --ink: #26292e; --muted: #5d6168; --paper: #fbfaf6; --rule: #e2dfd6; --accent: #0072b2; --warn: #d55e00; }
html { background: var(--paper); }
body { font-family: "DejaVu Sans", sans-serif; color: var(--ink); max-width: 60rem; margin: 0 auto; padding: 2rem 1.5rem 4rem; line-height: 1.5; font-size: 15px; }
header { border-bottom: 3px solid var(--rule); margin-bottom: 1.5rem; }
h1 { font-size: 1.7rem; font-weight: normal; margin: 0 0 0.2rem; }
.sub { color: var(--muted); margin: 0 0 1rem; }
h2 { font-size: 1.25rem; font-weight: normal; color: var(--accent); border-bottom: 1px solid var(--rule); padding-bottom: 0.2rem; margin-top: 2.2rem; }
h3 { font-size: 1.05rem; margin: 1.4rem 0 0.4rem; }
table { border-collapse: collapse; margin: 0.6rem 0 1.2rem; font-size: 0.9rem; }
th, td { padding: 0.25rem 0.6rem; border-bottom: 1px solid var(--rule); text-align: left; vertical-align: top; }
th { font-weight: bold; border-bottom: 2px solid var(--ink); }
td.n { text-align: right; font-variant-numeric: tabular-nums; }
figure { margin: 1.2rem 0 2rem; }
svg.chart { width: 100%; height: auto; display: block; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 0.9rem; margin-top: 0.4rem; }
.lead { font-size: 1.1rem; }
.caution { border-left: 4px solid var(--warn); padding: 0.4rem 0.8rem; background: #fff3e8; }
ul.warnings li { margin-bottom: 0.3rem; }
footer { margin-top: 3rem; color: var(--muted); font-size: 0.85rem; border-top: 1px solid var(--rule); padding-top: 0.6rem; }
@media print {
  @page { margin: 15mm 14mm; }
  html, body { background: white; }
  body { max-width: none; padding: 0; font-size: 10.5pt; }
  section { break-before: page; }
  section:first-of-type { break-before: auto; }
  figure, table, .caution { break-inside: avoid; }
  h2, h3 { break-after: avoid; }
  thead { display: table-header-group; }
  svg.chart { border: none; }
}
"#;

/// The whole page. The embedded font is declared inline so the charts' SVG text and the body
/// text render in it with no font installed.
pub fn render(r: &Report) -> String {
    let mut o = String::new();
    o.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n");
    o.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n");
    o.push_str(&format!("<title>{}</title>\n<style>\n", esc(&r.title)));
    o.push_str(&format!(
        "@font-face {{ font-family: \"{FAMILY}\"; src: url(data:font/ttf;base64,{}) format(\"truetype\"); }}\n",
        base64(FONT_TTF)
    ));
    o.push_str(CSS);
    o.push_str("</style>\n</head>\n<body>\n<header>\n");
    o.push_str(&format!(
        "<h1>{}</h1>\n<p class=\"sub\">{}</p>\n",
        esc(&r.title),
        esc(&r.subtitle)
    ));
    o.push_str("<nav><p>");
    for (i, s) in r.sections.iter().enumerate() {
        if i > 0 {
            o.push_str(" · ");
        }
        o.push_str(&format!(
            "<a href=\"#{}\">{}</a>",
            esc(&s.id),
            esc(&s.heading)
        ));
    }
    o.push_str("</p></nav>\n</header>\n<main>\n");
    for s in &r.sections {
        o.push_str(&format!(
            "<section id=\"{}\">\n<h2>{}</h2>\n{}</section>\n",
            esc(&s.id),
            esc(&s.heading),
            s.body
        ));
    }
    o.push_str(&format!(
        "</main>\n<footer>Made with dwell {}. Text and charts use DejaVu Sans (Bitstream Vera licence), embedded in this file.</footer>\n</body>\n</html>\n",
        env!("CARGO_PKG_VERSION")
    ));
    o
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn base64_matches_rfc4648_test_vectors() {
        // RFC 4648 §10 test vectors.
        for (i, o) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(base64(i.as_bytes()), o);
        }
    }

    #[test]
    fn inline_svg_drops_the_namespace_and_size() {
        let s = inline_svg("<svg width=\"1000\" height=\"560\" viewBox=\"0 0 1000 560\" xmlns=\"http://www.w3.org/2000/svg\">\n<rect/></svg>", "a <b>");
        assert_eq!(s, "<svg class=\"chart\" role=\"img\" aria-label=\"a &lt;b&gt;\" viewBox=\"0 0 1000 560\">\n<rect/></svg>");
    }

    #[test]
    fn a_page_is_well_formed_and_self_contained() {
        let r = Report {
            title: "T & co".into(),
            subtitle: "s".into(),
            sections: vec![Section {
                id: "a".into(),
                heading: "A".into(),
                body: table(&["x", "y"], &[vec!["1.5".into(), "<b>".into()]]),
            }],
        };
        let html = render(&r);
        // roxmltree 0.20 (an XML 1.0 parser): the page is well-formed XML as well as HTML.
        let opts = roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        };
        let doc = roxmltree::Document::parse_with_options(&html, opts).unwrap();
        assert_eq!(
            doc.descendants().filter(|n| n.has_tag_name("td")).count(),
            2
        );
        assert!(!html.contains("http://") && !html.contains("https://"));
    }
}
