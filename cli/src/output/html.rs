//! report.html: report.md as one self-contained page for a browser, with
//! the warnings first and every picture inline (no file beside it needed,
//! no script, no network). It is made from report.md's own text, so the
//! two never say different things; only the markdown that report.md uses
//! is understood: headings, paragraphs, lists, tables, pictures, `code`.

use super::svg::escape;

/// The page of a report: `markdown` is report.md, `pictures` maps a picture's
/// file name to its SVG text.
pub fn page(markdown: &str, pictures: &dyn Fn(&str) -> Option<String>) -> String {
    let (title, warnings, rest) = split_warnings(markdown);
    let mut body = format!("<h1>{}</h1>\n", inline(&title));
    body += &match warnings {
        Some(w) => format!(
            "<section class=\"warnings\" role=\"alert\">\n<h2>Warnings</h2>\n{}</section>\n",
            blocks(&w, pictures)
        ),
        None => "<section class=\"no-warnings\"><p>No warnings.</p></section>\n".to_string(),
    };
    body += &blocks(&rest, pictures);
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n<main>\n{body}</main>\n</body>\n</html>\n",
        escape(&title)
    )
}

const STYLE: &str = "body{font-family:system-ui,sans-serif;margin:0;background:#f6f6f4;color:#1d1d1b}\
main{max-width:60rem;margin:0 auto;padding:1.5rem 2rem;background:#fff}\
h1{font-size:1.6rem;margin:0 0 1rem}h2{font-size:1.2rem;margin-top:2rem;border-bottom:1px solid #ddd}\
table{border-collapse:collapse;margin:0.5rem 0}td,th{border:1px solid #ccc;padding:0.25rem 0.6rem;text-align:left}\
th{background:#eee}td{font-variant-numeric:tabular-nums}\
.warnings{border-left:0.4rem solid #c0392b;background:#fdf0ee;padding:0.2rem 1rem;margin-bottom:1rem}\
.warnings h2{margin-top:0.5rem;border:0;color:#a12a1d}.no-warnings{color:#2f6b2f}\
figure{margin:1rem 0}figure svg{max-width:100%;height:auto}figcaption{color:#555;font-size:0.9rem}\
code{background:#f0f0f0;padding:0 0.2rem}";

/// The title (first `# ` line), the Warnings section's body if any, and
/// everything else in order.
fn split_warnings(md: &str) -> (String, Option<String>, String) {
    let mut title = String::new();
    let (mut warnings, mut rest) = (None::<String>, String::new());
    let mut in_warnings = false;
    for line in md.lines() {
        if title.is_empty() && line.starts_with("# ") {
            title = line[2..].to_string();
            continue;
        }
        // The section is its list: it ends at the next heading or at the
        // first line that is neither blank nor a list item.
        if in_warnings && !line.trim().is_empty() && !line.starts_with("- ") && !line.starts_with("## ") {
            in_warnings = false;
        }
        if line.starts_with("## ") {
            in_warnings = line == "## Warnings";
            if in_warnings {
                warnings = Some(String::new());
                continue;
            }
        }
        let target = if in_warnings { warnings.get_or_insert_with(String::new) } else { &mut rest };
        target.push_str(line);
        target.push('\n');
    }
    (title, warnings, rest)
}

/// Block-level markdown to HTML: blank-line separated paragraphs, `- `
/// lists, `|` tables (the second row is the rule), `## ` headings and
/// `![title](file)` pictures, inlined.
fn blocks(md: &str, pictures: &dyn Fn(&str) -> Option<String>) -> String {
    let mut out = String::new();
    let lines: Vec<&str> = md.lines().collect();
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i].trim_end();
        let run = |pred: &dyn Fn(&str) -> bool| lines[i..].iter().take_while(|l| pred(l)).count();
        if line.is_empty() {
            i += 1;
        } else if let Some(h) = line.strip_prefix("## ") {
            out += &format!("<h2>{}</h2>\n", inline(h));
            i += 1;
        } else if let Some((title, file)) = picture(line) {
            out += &figure(title, file, pictures);
            i += 1;
        } else if line.starts_with("- ") {
            let n = run(&|l| l.starts_with("- "));
            let items: String = lines[i..i + n].iter().map(|l| format!("<li>{}</li>\n", inline(&l[2..]))).collect();
            out += &format!("<ul>\n{items}</ul>\n");
            i += n;
        } else if line.starts_with('|') {
            let n = run(&|l| l.starts_with('|'));
            out += &table(&lines[i..i + n]);
            i += n;
        } else {
            let n = run(&|l| !l.trim().is_empty() && !l.starts_with("## ") && !l.starts_with("- ") && !l.starts_with('|') && picture(l).is_none());
            let text: Vec<String> = lines[i..i + n.max(1)].iter().map(|l| inline(l)).collect();
            out += &format!("<p>{}</p>\n", text.join(" "));
            i += n.max(1);
        }
    }
    out
}

/// `![title](file)` alone on a line.
fn picture(line: &str) -> Option<(&str, &str)> {
    let rest = line.strip_prefix("![")?;
    let (title, rest) = rest.split_once("](")?;
    Some((title, rest.strip_suffix(')')?))
}

/// A picture inlined as SVG (its XML prolog dropped), or a note where the
/// file is not in the set.
fn figure(title: &str, file: &str, pictures: &dyn Fn(&str) -> Option<String>) -> String {
    match pictures(file) {
        Some(svg) => {
            let svg = svg.trim_start_matches(|c| c != '<');
            let svg = if svg.starts_with("<?xml") {
                svg.split_once("?>").map_or(svg, |x| x.1)
            } else {
                svg
            };
            format!("<figure>\n{}\n<figcaption>{}</figcaption>\n</figure>\n", svg.trim(), escape(title))
        }
        None => format!("<p class=\"missing\">({}: {} not written)</p>\n", escape(title), escape(file)),
    }
}

/// A markdown table: header row, rule row, body rows.
fn table(rows: &[&str]) -> String {
    let cells = |r: &str| -> Vec<String> { r.trim().trim_matches('|').split('|').map(|c| inline(c.trim())).collect() };
    let mut out = String::from("<table>\n");
    if let Some(head) = rows.first() {
        out += &format!(
            "<thead><tr>{}</tr></thead>\n<tbody>\n",
            cells(head).iter().map(|c| format!("<th>{c}</th>")).collect::<String>()
        );
    }
    for r in rows.iter().skip(2) {
        out += &format!("<tr>{}</tr>\n", cells(r).iter().map(|c| format!("<td>{c}</td>")).collect::<String>());
    }
    out + "</tbody>\n</table>\n"
}

/// Escapes text and turns `code` spans into <code>.
fn inline(text: &str) -> String {
    let mut out = String::new();
    for (k, piece) in text.split('`').enumerate() {
        if k % 2 == 1 {
            out += &format!("<code>{}</code>", escape(piece));
        } else {
            out += &escape(piece);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Warnings come first whatever their place in report.md; tables,
    /// lists and pictures come through; text is escaped.
    #[test]
    fn the_page_leads_with_warnings_and_inlines_pictures() {
        let md = "# a <b> title\n\nsome `code` text\nmore text\n\n## Forces\n\n| set | F |\n|---|---|\n| pull | 3 N |\n\n## Warnings\n\n- it saturates\n\n![map](m.svg)\n\n## Cautions\n\n- careful\n";
        let html = page(md, &|f| (f == "m.svg").then(|| "<?xml version=\"1.0\"?>\n<svg><rect/></svg>".to_string()));
        let (w, f) = (html.find("it saturates").unwrap(), html.find("<h2>Forces</h2>").unwrap());
        assert!(w < f, "warnings are not first");
        let (end, map) = (html.find("</section>").unwrap(), html.find("<svg>").unwrap());
        assert!(end < map, "the picture after the warning list is not part of the warnings");
        assert!(html.contains("<h1>a &lt;b&gt; title</h1>"));
        assert!(html.contains("<p>some <code>code</code> text more text</p>"));
        assert!(html.contains("<svg><rect/></svg>") && !html.contains("<?xml"));
        assert!(html.contains("<td>pull</td><td>3 N</td>"));
        assert!(html.contains("<li>careful</li>"));
        let none = page("# t\n\ntext\n", &|_| None);
        assert!(none.contains("No warnings."));
    }
}
