//! The report as one self-contained HTML page: inline styles and inline SVG charts, no
//! scripts, fonts or images fetched from anywhere.

use std::fmt::Write;

use crate::blocks::{Align, Block, Report};
use crate::figure::{Figure, Mark, ticks, x_ticks};
use crate::palette;
use crate::visual::Shape;

fn esc(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            _ => out.push(c),
        }
    }
    out
}

fn rgb(c: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

const STYLE: &str = "body{font-family:Helvetica,Arial,sans-serif;color:#282830;max-width:60rem;margin:2rem auto;padding:0 1rem;line-height:1.4}
h1{font-size:1.5rem;margin-bottom:.2rem}h2{font-size:1.1rem;margin-top:1.6rem;border-bottom:1px solid #e1e4e8}
.sub{color:#555}.headline{display:flex;flex-wrap:wrap;gap:1rem;margin:1rem 0}
.headline div{border:1px solid #d0d4da;border-radius:6px;padding:.5rem .9rem}
.headline b{display:block;font-size:1.5rem}table{border-collapse:collapse;width:100%;font-size:.85rem}
th,td{border-bottom:1px solid #e1e4e8;padding:.25rem .4rem;vertical-align:top}th{text-align:left;background:#f4f5f7}
.r{text-align:right;white-space:nowrap}dl{display:grid;grid-template-columns:14rem 1fr;gap:.2rem 1rem}dt{color:#555}dd{margin:0}
.cautions{border:2px solid #c08b1a;border-radius:6px;padding:.5rem 1rem;background:#fdf8ec}
.warnings{border:2px solid #b3261e;border-radius:6px;padding:.5rem 1rem;margin:.5rem 0;background:#fdf0ef}
footer{margin-top:2rem;font-size:.75rem;color:#666}svg{max-width:100%;height:auto}";

/// Writes the report as HTML.
#[must_use]
pub fn render(report: &Report) -> String {
    let mut out = String::new();
    let _ = write!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>{}</title><style>{STYLE}</style></head><body>\n<h1>{}</h1><p class=\"sub\">{}</p>\n",
        esc(&report.title),
        esc(&report.title),
        esc(&report.subtitle)
    );
    for block in &report.blocks {
        block_html(&mut out, block);
    }
    let _ = write!(
        out,
        "<footer>{}</footer>\n</body></html>\n",
        esc(&report.footer)
    );
    out
}

fn block_html(out: &mut String, block: &Block) {
    match block {
        Block::Heading(text) => {
            let _ = writeln!(out, "<h2>{}</h2>", esc(text));
        }
        Block::Paragraph(text) => {
            let _ = writeln!(out, "<p>{}</p>", esc(text));
        }
        Block::Headline(items) => {
            out.push_str("<div class=\"headline\">");
            for (label, value) in items {
                let _ = write!(out, "<div>{}<b>{}</b></div>", esc(label), esc(value));
            }
            out.push_str("</div>\n");
        }
        Block::Facts(facts) => {
            out.push_str("<dl>");
            for (k, v) in facts {
                let _ = write!(out, "<dt>{}</dt><dd>{}</dd>", esc(k), esc(v));
            }
            out.push_str("</dl>\n");
        }
        Block::Table { columns, rows } => {
            out.push_str("<table><thead><tr>");
            for c in columns {
                let class = if c.align == Align::Right {
                    " class=\"r\""
                } else {
                    ""
                };
                let _ = write!(out, "<th{class}>{}</th>", esc(&c.title));
            }
            out.push_str("</tr></thead><tbody>\n");
            for row in rows {
                out.push_str("<tr>");
                for (cell, c) in row.iter().zip(columns) {
                    let class = if c.align == Align::Right {
                        " class=\"r\""
                    } else {
                        ""
                    };
                    let _ = write!(out, "<td{class}>{}</td>", esc(cell));
                }
                out.push_str("</tr>\n");
            }
            out.push_str("</tbody></table>\n");
        }
        Block::Chart(figure) => svg(out, figure),
        Block::List(items) => {
            out.push_str("<ul>");
            for i in items {
                let _ = write!(out, "<li>{}</li>", esc(i));
            }
            out.push_str("</ul>\n");
        }
        Block::Warnings(items) => {
            out.push_str(
                "<div class=\"warnings\"><b>Warnings: what the market cannot support</b><ul>",
            );
            for i in items {
                let _ = write!(out, "<li>{}</li>", esc(i));
            }
            out.push_str("</ul></div>\n");
        }
        Block::Cautions(items) => {
            out.push_str("<div class=\"cautions\"><ul>");
            for i in items {
                let _ = write!(out, "<li>{}</li>", esc(i));
            }
            out.push_str("</ul></div>\n");
        }
    }
}

/// Maps data coordinates to the plot area of a `w` × `h` chart.
pub(crate) struct Frame {
    pub left: f64,
    pub top: f64,
    pub width: f64,
    pub height: f64,
    pub x: (f64, f64),
    pub y: (f64, f64),
}

impl Frame {
    pub fn px(&self, x: f64) -> f64 {
        self.left + (x - self.x.0) / (self.x.1 - self.x.0) * self.width
    }
    pub fn py(&self, y: f64) -> f64 {
        self.top + self.height - (y - self.y.0) / (self.y.1 - self.y.0) * self.height
    }
}

/// Tick label for an axis value.
pub(crate) fn tick_label(value: f64, is_year: bool) -> String {
    if is_year {
        format!("{value:.0}")
    } else if value.abs() >= 1_000.0 {
        format!("{}k", model::format::thousands(value / 1_000.0))
    } else {
        format!("{value:.0}")
    }
}

fn svg(out: &mut String, f: &Figure) {
    let (w, h) = (760.0, 330.0);
    let (xr, yr) = f.bounds();
    let frame = Frame {
        left: 70.0,
        top: 30.0,
        width: w - 90.0,
        height: h - 75.0,
        x: xr,
        y: yr,
    };
    let _ = write!(
        out,
        "<figure><svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\" font-family=\"Helvetica,Arial,sans-serif\" font-size=\"11\">",
        esc(&f.title)
    );
    let _ = write!(
        out,
        "<text x=\"{}\" y=\"18\" font-size=\"13\" font-weight=\"bold\">{}</text>",
        frame.left,
        esc(&f.title)
    );
    let x_ticks = x_ticks(f, xr);
    for t in &x_ticks {
        let x = frame.px(*t);
        let _ = write!(
            out,
            "<line x1=\"{x:.1}\" y1=\"{:.1}\" x2=\"{x:.1}\" y2=\"{:.1}\" stroke=\"{}\"/><text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\">{}</text>",
            frame.top,
            frame.top + frame.height,
            rgb(palette::GRID),
            frame.top + frame.height + 14.0,
            tick_label(*t, f.x_is_year)
        );
    }
    for t in ticks(yr.0, yr.1, 5) {
        let y = frame.py(t);
        let _ = write!(
            out,
            "<line x1=\"{:.1}\" y1=\"{y:.1}\" x2=\"{:.1}\" y2=\"{y:.1}\" stroke=\"{}\"/><text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">${}</text>",
            frame.left,
            frame.left + frame.width,
            rgb(palette::GRID),
            frame.left - 6.0,
            y + 4.0,
            tick_label(t, false)
        );
    }
    let _ = write!(
        out,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\">{}</text>",
        frame.left + frame.width / 2.0,
        frame.top + frame.height + 30.0,
        esc(&f.x_label)
    );
    for m in &f.marks {
        mark_svg(out, &frame, m);
    }
    out.push_str("</svg>");
    let legend: Vec<String> = f
        .legend
        .iter()
        .map(|k| {
            let mut mark = String::from(
                "<svg width=\"14\" height=\"12\" viewBox=\"0 0 14 12\" style=\"vertical-align:middle\">",
            );
            match k.shape {
                Some(shape) => shape_svg(&mut mark, shape, 7.0, 6.0, 4.0, &rgb(k.rgb)),
                None => {
                    let _ = write!(
                        mark,
                        "<line x1=\"0\" y1=\"6\" x2=\"14\" y2=\"6\" stroke=\"{}\" stroke-width=\"2\"/>",
                        rgb(k.rgb)
                    );
                }
            }
            mark.push_str("</svg>");
            format!("{mark} {}", esc(&k.text))
        })
        .collect();
    let _ = writeln!(
        out,
        "<figcaption>{}</figcaption></figure>",
        legend.join(" &nbsp; ")
    );
}

/// Draws one `shape` centered at (x, y), `size` its half-width in pixels.
pub(crate) fn shape_svg(out: &mut String, shape: Shape, x: f64, y: f64, size: f64, color: &str) {
    let r = size;
    match shape {
        Shape::Circle => {
            let _ = write!(
                out,
                "<circle cx=\"{x:.1}\" cy=\"{y:.1}\" r=\"{r:.1}\" fill=\"{color}\"/>"
            );
        }
        Shape::Square => {
            let _ = write!(
                out,
                "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"{:.1}\" fill=\"{color}\"/>",
                x - r,
                y - r,
                2.0 * r,
                2.0 * r
            );
        }
        Shape::Diamond => {
            let d = r * 1.3;
            let _ = write!(
                out,
                "<path d=\"M{x:.1} {:.1} L{:.1} {y:.1} L{x:.1} {:.1} L{:.1} {y:.1} Z\" fill=\"{color}\"/>",
                y - d,
                x + d,
                y + d,
                x - d
            );
        }
        Shape::Cross => {
            let _ = write!(
                out,
                "<path d=\"M{:.1} {:.1} L{:.1} {:.1} M{:.1} {:.1} L{:.1} {:.1}\" stroke=\"{color}\" stroke-width=\"3\" stroke-linecap=\"round\"/>",
                x - r,
                y - r,
                x + r,
                y + r,
                x - r,
                y + r,
                x + r,
                y - r
            );
        }
        Shape::Ring => {
            let _ = write!(
                out,
                "<circle cx=\"{x:.1}\" cy=\"{y:.1}\" r=\"{r:.1}\" fill=\"none\" stroke=\"{color}\" stroke-width=\"1.5\"/>"
            );
        }
        Shape::TriangleDown => {
            let _ = write!(
                out,
                "<path d=\"M{:.1} {:.1} L{:.1} {:.1} L{x:.1} {:.1} Z\" fill=\"{color}\"/>",
                x - r,
                y - r,
                x + r,
                y - r,
                y + r
            );
        }
    }
}

/// The size a shape is drawn at in a chart: listings small, the subject and comparables large.
pub(crate) fn chart_size(shape: Shape) -> f64 {
    match shape {
        Shape::Circle | Shape::Square | Shape::Diamond => 1.8,
        Shape::Cross => 6.5,
        Shape::Ring => 5.5,
        Shape::TriangleDown => 4.0,
    }
}

fn mark_svg(out: &mut String, frame: &Frame, m: &Mark) {
    match m {
        Mark::Points {
            points,
            shape,
            rgb: c,
            numbered,
        } => {
            let color = rgb(*c);
            for (i, &(x, y)) in points.iter().enumerate() {
                let (x, y) = (frame.px(x), frame.py(y));
                shape_svg(out, *shape, x, y, chart_size(*shape), &color);
                if *numbered {
                    let _ = write!(
                        out,
                        "<text x=\"{:.1}\" y=\"{:.1}\" fill=\"{color}\" font-size=\"10\">{}</text>",
                        x + 7.0,
                        y - 5.0,
                        i + 1
                    );
                }
            }
        }
        Mark::Line {
            points,
            rgb: c,
            dashed,
        } => {
            let path: Vec<String> = points
                .iter()
                .map(|&(x, y)| format!("{:.1},{:.1}", frame.px(x), frame.py(y)))
                .collect();
            let _ = write!(
                out,
                "<polyline points=\"{}\" fill=\"none\" stroke=\"{}\" stroke-width=\"1.5\"{}/>",
                path.join(" "),
                rgb(*c),
                if *dashed {
                    " stroke-dasharray=\"5 4\""
                } else {
                    ""
                }
            );
        }
        Mark::Range {
            x,
            low,
            high,
            rgb: c,
        } => {
            let x = frame.px(*x);
            let (y0, y1) = (frame.py(*low), frame.py(*high));
            let color = rgb(*c);
            let _ = write!(
                out,
                "<line x1=\"{x:.1}\" y1=\"{y0:.1}\" x2=\"{x:.1}\" y2=\"{y1:.1}\" stroke=\"{color}\" stroke-width=\"3\"/><line x1=\"{:.1}\" y1=\"{y0:.1}\" x2=\"{:.1}\" y2=\"{y0:.1}\" stroke=\"{color}\" stroke-width=\"2\"/><line x1=\"{:.1}\" y1=\"{y1:.1}\" x2=\"{:.1}\" y2=\"{y1:.1}\" stroke=\"{color}\" stroke-width=\"2\"/>",
                x - 6.0,
                x + 6.0,
                x - 6.0,
                x + 6.0
            );
        }
    }
}
