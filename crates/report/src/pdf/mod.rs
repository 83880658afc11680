//! The report as a PDF: US Letter pages, the standard Helvetica fonts (nothing embedded, so
//! any reader shows it and its text can be searched and copied), vector charts.

mod metrics;

use pdf_writer::{Content, Filter, Finish, Name, Pdf, Rect, Ref, Str, TextStr};

use crate::blocks::{Align, Block, Column, Report};
use crate::figure::{Figure, Mark, ticks, x_ticks};
use crate::html::{Frame, chart_size, tick_label};
use crate::palette;
use crate::visual::Shape;
pub use metrics::{width, win_ansi, wrap};

const PAGE_W: f32 = 612.0;
const PAGE_H: f32 = 792.0;
const MARGIN: f32 = 48.0;
const BOTTOM: f32 = 60.0;
const TEXT_W: f32 = PAGE_W - 2.0 * MARGIN;
const REGULAR: Name<'static> = Name(b"F1");
const BOLD: Name<'static> = Name(b"F2");

fn rgb(c: [u8; 3]) -> (f32, f32, f32) {
    (
        f32::from(c[0]) / 255.0,
        f32::from(c[1]) / 255.0,
        f32::from(c[2]) / 255.0,
    )
}

/// Lays blocks out on pages.
struct Layout {
    pages: Vec<Content>,
    page: Content,
    /// Baseline of the next line, from the page's bottom.
    y: f32,
}

impl Layout {
    fn new() -> Self {
        Self {
            pages: Vec::new(),
            page: Content::new(),
            y: PAGE_H - MARGIN,
        }
    }

    fn new_page(&mut self) {
        let page = std::mem::replace(&mut self.page, Content::new());
        self.pages.push(page);
        self.y = PAGE_H - MARGIN;
    }

    /// Starts a new page unless `height` points still fit on this one.
    fn room(&mut self, height: f32) {
        if self.y - height < BOTTOM {
            self.new_page();
        }
    }

    fn color(&mut self, c: [u8; 3]) {
        let (r, g, b) = rgb(c);
        self.page.set_fill_rgb(r, g, b);
        self.page.set_stroke_rgb(r, g, b);
    }

    fn text_at(&mut self, x: f32, y: f32, text: &str, size: f32, bold: bool) {
        self.page.begin_text();
        self.page.set_font(if bold { BOLD } else { REGULAR }, size);
        self.page.next_line(x, y);
        self.page.show(Str(&win_ansi(text)));
        self.page.end_text();
    }

    /// Writes wrapped text at the cursor and moves it down.
    fn flow(&mut self, text: &str, size: f32, bold: bool, indent: f32) {
        let leading = size * 1.3;
        for line in wrap(text, size, bold, TEXT_W - indent) {
            self.room(leading);
            self.y -= leading;
            self.text_at(MARGIN + indent, self.y, &line, size, bold);
        }
    }

    fn rule(&mut self, y: f32, c: [u8; 3]) {
        self.color(c);
        self.page.set_line_width(0.5);
        self.page.move_to(MARGIN, y);
        self.page.line_to(PAGE_W - MARGIN, y);
        self.page.stroke();
    }

    fn block(&mut self, block: &Block) {
        match block {
            Block::Heading(text) => {
                self.room(40.0);
                self.y -= 10.0;
                self.color(palette::INK);
                self.flow(text, 12.5, true, 0.0);
                self.rule(self.y - 3.0, palette::GRID);
                self.y -= 6.0;
            }
            Block::Paragraph(text) => {
                self.color(palette::INK);
                self.flow(text, 9.0, false, 0.0);
                self.y -= 4.0;
            }
            Block::Headline(items) => self.headline(items),
            Block::Facts(facts) => self.facts(facts),
            Block::Table { columns, rows } => self.table(columns, rows),
            Block::Chart(figure) => self.chart(figure),
            Block::List(items) => {
                self.color(palette::INK);
                for item in items {
                    self.bullet(item);
                }
                self.y -= 4.0;
            }
            Block::Cautions(items) => self.boxed(None, items, palette::CAUTION),
            Block::Warnings(items) => self.boxed(
                Some("Warnings: what the market cannot support"),
                items,
                palette::WARNING,
            ),
        }
    }

    fn bullet(&mut self, item: &str) {
        let lines = wrap(item, 9.0, false, TEXT_W - 14.0);
        for (i, line) in lines.iter().enumerate() {
            self.room(11.7);
            self.y -= 11.7;
            if i == 0 {
                self.text_at(MARGIN + 2.0, self.y, "•", 9.0, false);
            }
            self.text_at(MARGIN + 14.0, self.y, line, 9.0, false);
        }
    }

    fn headline(&mut self, items: &[(String, String)]) {
        let height = 46.0;
        self.room(height + 10.0);
        let gap = 8.0;
        let w = (TEXT_W - gap * (items.len().max(1) - 1) as f32) / items.len().max(1) as f32;
        let top = self.y - 6.0;
        for (i, (label, value)) in items.iter().enumerate() {
            let x = MARGIN + i as f32 * (w + gap);
            self.color(palette::GRID);
            self.page.set_line_width(1.0);
            self.page.rect(x, top - height, w, height);
            self.page.stroke();
            self.color(palette::INK);
            self.text_at(x + 7.0, top - 14.0, label, 8.0, false);
            let size = if width(value, 15.0, true) > w - 14.0 {
                10.0
            } else {
                15.0
            };
            self.text_at(x + 7.0, top - 35.0, value, size, true);
        }
        self.y = top - height - 8.0;
    }

    fn facts(&mut self, facts: &[(String, String)]) {
        let label_w = 150.0;
        for (k, v) in facts {
            let lines = wrap(v, 9.0, false, TEXT_W - label_w);
            for (i, line) in lines.iter().enumerate() {
                self.room(11.7);
                self.y -= 11.7;
                if i == 0 {
                    self.color([0x60, 0x60, 0x68]);
                    self.text_at(MARGIN, self.y, k, 9.0, false);
                    self.color(palette::INK);
                }
                self.text_at(MARGIN + label_w, self.y, line, 9.0, false);
            }
        }
        self.y -= 4.0;
    }

    fn table(&mut self, columns: &[Column], rows: &[Vec<String>]) {
        let size = 7.5;
        let leading = 9.6;
        let total: f32 = columns.iter().map(|c| c.width).sum();
        let widths: Vec<f32> = columns.iter().map(|c| c.width / total * TEXT_W).collect();
        let header_cells: Vec<String> = columns.iter().map(|c| c.title.clone()).collect();
        let layout_row = |cells: &[String], bold: bool| -> Vec<Vec<String>> {
            cells
                .iter()
                .zip(&widths)
                .map(|(cell, w)| wrap(cell, size, bold, w - 4.0))
                .collect()
        };
        let header = layout_row(&header_cells, true);
        let header_lines = header.iter().map(Vec::len).max().unwrap_or(1) as f32;
        let draw_row = |layout: &mut Self, cells: &[Vec<String>], bold: bool| {
            let lines = cells.iter().map(Vec::len).max().unwrap_or(1) as f32;
            let top = layout.y;
            if bold {
                layout.color([0xf0, 0xf1, 0xf4]);
                layout.page.rect(
                    MARGIN,
                    top - lines * leading - 3.0,
                    TEXT_W,
                    lines * leading + 3.0,
                );
                layout.page.fill_nonzero();
            }
            layout.color(palette::INK);
            let mut x = MARGIN;
            for ((cell, w), column) in cells.iter().zip(&widths).zip(columns) {
                for (i, line) in cell.iter().enumerate() {
                    let y = top - (i as f32 + 1.0) * leading;
                    let tx = match column.align {
                        Align::Left => x + 2.0,
                        Align::Right => x + w - 2.0 - width(line, size, bold),
                    };
                    layout.text_at(tx, y, line, size, bold);
                }
                x += w;
            }
            layout.y = top - lines * leading - 3.0;
            layout.rule(layout.y + 1.0, palette::GRID);
        };
        self.room((header_lines + 2.0) * leading);
        draw_row(self, &header, true);
        for row in rows {
            let cells = layout_row(row, false);
            let lines = cells.iter().map(Vec::len).max().unwrap_or(1) as f32;
            if self.y - lines * leading - 3.0 < BOTTOM {
                self.new_page();
                draw_row(self, &header, true);
            }
            draw_row(self, &cells, false);
        }
        self.y -= 6.0;
    }

    /// A list in a box drawn in `color`, under an optional bold title.
    fn boxed(&mut self, title: Option<&str>, items: &[String], color: [u8; 3]) {
        let lines: Vec<Vec<String>> = items
            .iter()
            .map(|i| wrap(i, 9.0, false, TEXT_W - 30.0))
            .collect();
        let title_h = if title.is_some() { 13.0 } else { 0.0 };
        let height = lines.iter().map(Vec::len).sum::<usize>() as f32 * 11.7 + 14.0 + title_h;
        self.room(height + 6.0);
        let top = self.y - 2.0;
        self.color(color);
        self.page.set_line_width(1.5);
        self.page.rect(MARGIN, top - height, TEXT_W, height);
        self.page.stroke();
        self.color(palette::INK);
        let mut y = top - 4.0;
        if let Some(t) = title {
            y -= 11.7;
            self.text_at(MARGIN + 8.0, y, t, 9.0, true);
            y -= 1.3;
        }
        for item in &lines {
            for (i, line) in item.iter().enumerate() {
                y -= 11.7;
                if i == 0 {
                    self.text_at(MARGIN + 8.0, y, "•", 9.0, false);
                }
                self.text_at(MARGIN + 20.0, y, line, 9.0, false);
            }
        }
        self.y = top - height - 8.0;
    }

    fn chart(&mut self, f: &Figure) {
        let legend: Vec<Vec<String>> = f
            .legend
            .iter()
            .map(|k| wrap(&k.text, 7.5, false, TEXT_W - 16.0))
            .collect();
        let legend_h = legend.iter().map(Vec::len).sum::<usize>() as f32 * 9.6;
        let plot_h = 190.0;
        let total = plot_h + 60.0 + legend_h;
        self.room(total);
        let top = self.y - 6.0;
        self.color(palette::INK);
        self.text_at(MARGIN, top - 11.0, &f.title, 10.0, true);
        let (xr, yr) = f.bounds();
        // The SVG frame maps y downwards; here y grows upwards, so map through it and flip.
        let frame = Frame {
            left: f64::from(MARGIN + 50.0),
            top: 0.0,
            width: f64::from(TEXT_W - 60.0),
            height: f64::from(plot_h),
            x: xr,
            y: yr,
        };
        let plot_bottom = top - 20.0 - plot_h;
        let py = |y: f64| plot_bottom + plot_h - frame.py(y) as f32;
        let px = |x: f64| frame.px(x) as f32;
        let x_ticks = x_ticks(f, xr);
        self.page.set_line_width(0.5);
        for t in &x_ticks {
            self.color(palette::GRID);
            self.page.move_to(px(*t), plot_bottom);
            self.page.line_to(px(*t), plot_bottom + plot_h);
            self.page.stroke();
            self.color(palette::INK);
            let label = tick_label(*t, f.x_is_year);
            self.text_at(
                px(*t) - width(&label, 7.5, false) / 2.0,
                plot_bottom - 11.0,
                &label,
                7.5,
                false,
            );
        }
        for t in ticks(yr.0, yr.1, 5) {
            self.color(palette::GRID);
            self.page.move_to(frame.left as f32, py(t));
            self.page.line_to((frame.left + frame.width) as f32, py(t));
            self.page.stroke();
            self.color(palette::INK);
            let label = format!("${}", tick_label(t, false));
            self.text_at(
                frame.left as f32 - 4.0 - width(&label, 7.5, false),
                py(t) - 2.5,
                &label,
                7.5,
                false,
            );
        }
        self.text_at(
            (frame.left + frame.width / 2.0) as f32,
            plot_bottom - 23.0,
            &f.x_label,
            7.5,
            false,
        );
        for m in &f.marks {
            self.mark(m, &px, &py);
        }
        self.page.set_dash_pattern([], 0.0);
        let mut y = plot_bottom - 30.0;
        for (k, lines) in f.legend.iter().zip(&legend) {
            for (i, line) in lines.iter().enumerate() {
                y -= 9.6;
                if i == 0 {
                    self.color(k.rgb);
                    if let Some(shape) = k.shape {
                        self.shape(shape, MARGIN + 4.0, y + 3.0, 3.2);
                    } else {
                        self.page.set_line_width(1.5);
                        self.page.move_to(MARGIN, y + 3.0);
                        self.page.line_to(MARGIN + 9.0, y + 3.0);
                        self.page.stroke();
                    }
                    self.color(palette::INK);
                }
                self.text_at(MARGIN + 12.0, y, line, 7.5, false);
            }
        }
        self.y = y - 8.0;
    }

    /// A circle path of radius `r` at (x, y) (four Bézier arcs; k is the usual control-point
    /// distance for a quarter circle); the caller fills or strokes it.
    fn circle_path(&mut self, x: f32, y: f32, r: f32) {
        let k = 0.552_284_8 * r;
        self.page.move_to(x + r, y);
        self.page.cubic_to(x + r, y + k, x + k, y + r, x, y + r);
        self.page.cubic_to(x - k, y + r, x - r, y + k, x - r, y);
        self.page.cubic_to(x - r, y - k, x - k, y - r, x, y - r);
        self.page.cubic_to(x + k, y - r, x + r, y - k, x + r, y);
    }

    /// One `shape` centered at (x, y) with half-width `r`, in the current color.
    fn shape(&mut self, shape: Shape, x: f32, y: f32, r: f32) {
        match shape {
            Shape::Circle => {
                self.circle_path(x, y, r);
                self.page.fill_nonzero();
            }
            Shape::Square => {
                self.page.rect(x - r, y - r, 2.0 * r, 2.0 * r);
                self.page.fill_nonzero();
            }
            Shape::Diamond => {
                let d = r * 1.3;
                self.page.move_to(x, y + d);
                self.page.line_to(x + d, y);
                self.page.line_to(x, y - d);
                self.page.line_to(x - d, y);
                self.page.close_path();
                self.page.fill_nonzero();
            }
            Shape::Cross => {
                self.page.set_line_width(2.0);
                self.page.move_to(x - r, y - r);
                self.page.line_to(x + r, y + r);
                self.page.move_to(x - r, y + r);
                self.page.line_to(x + r, y - r);
                self.page.stroke();
            }
            Shape::Ring => {
                self.page.set_line_width(1.0);
                self.circle_path(x, y, r);
                self.page.stroke();
            }
            Shape::TriangleDown => {
                self.page.move_to(x - r, y + r);
                self.page.line_to(x + r, y + r);
                self.page.line_to(x, y - r);
                self.page.close_path();
                self.page.fill_nonzero();
            }
        }
    }

    fn mark(&mut self, m: &Mark, px: &impl Fn(f64) -> f32, py: &impl Fn(f64) -> f32) {
        match m {
            Mark::Points {
                points,
                shape,
                rgb: c,
                numbered,
            } => {
                self.color(*c);
                // PDF points are a little smaller than the HTML's pixels.
                let r = chart_size(*shape) as f32 * 0.7;
                for (i, &(x, y)) in points.iter().enumerate() {
                    let (x, y) = (px(x), py(y));
                    self.shape(*shape, x, y, r);
                    if *numbered {
                        self.text_at(x + r + 1.5, y + 2.5, &(i + 1).to_string(), 7.0, true);
                    }
                }
            }
            Mark::Line {
                points,
                rgb: c,
                dashed,
            } => {
                self.color(*c);
                self.page.set_line_width(1.2);
                if *dashed {
                    self.page.set_dash_pattern([4.0, 3.0], 0.0);
                } else {
                    self.page.set_dash_pattern([], 0.0);
                }
                for (i, &(x, y)) in points.iter().enumerate() {
                    if i == 0 {
                        self.page.move_to(px(x), py(y));
                    } else {
                        self.page.line_to(px(x), py(y));
                    }
                }
                self.page.stroke();
                self.page.set_dash_pattern([], 0.0);
            }
            Mark::Range {
                x,
                low,
                high,
                rgb: c,
            } => {
                self.color(*c);
                let x = px(*x);
                let (y0, y1) = (py(*low), py(*high));
                self.page.set_line_width(2.0);
                self.page.move_to(x, y0);
                self.page.line_to(x, y1);
                self.page.move_to(x - 4.5, y0);
                self.page.line_to(x + 4.5, y0);
                self.page.move_to(x - 4.5, y1);
                self.page.line_to(x + 4.5, y1);
                self.page.stroke();
            }
        }
    }
}

/// Writes the report as a PDF file's bytes.
#[must_use]
pub fn render(report: &Report) -> Vec<u8> {
    let mut layout = Layout::new();
    layout.color(palette::INK);
    layout.flow(&report.title, 16.0, true, 0.0);
    layout.color([0x55, 0x55, 0x5d]);
    layout.flow(&report.subtitle, 9.5, false, 0.0);
    for block in &report.blocks {
        layout.block(block);
    }
    layout.new_page();
    let pages = layout.pages;
    let count = pages.len();

    let mut pdf = Pdf::new();
    let catalog = Ref::new(1);
    let tree = Ref::new(2);
    let regular = Ref::new(3);
    let bold = Ref::new(4);
    let info = Ref::new(5);
    let first_page = 10;
    let page_ids: Vec<Ref> = (0..count)
        .map(|i| Ref::new(first_page + 2 * i as i32))
        .collect();
    pdf.catalog(catalog).pages(tree);
    pdf.pages(tree)
        .kids(page_ids.iter().copied())
        .count(count as i32);
    pdf.type1_font(regular)
        .base_font(Name(b"Helvetica"))
        .encoding_predefined(Name(b"WinAnsiEncoding"));
    pdf.type1_font(bold)
        .base_font(Name(b"Helvetica-Bold"))
        .encoding_predefined(Name(b"WinAnsiEncoding"));
    pdf.document_info(info)
        .title(TextStr(&report.title))
        .creator(TextStr("comptrail"));
    for (i, mut content) in pages.into_iter().enumerate() {
        let footer = format!("{}  ·  page {} of {count}", report.footer, i + 1);
        let (r, g, b) = rgb([0x70, 0x70, 0x78]);
        content.set_fill_rgb(r, g, b);
        content.begin_text();
        content.set_font(REGULAR, 7.0);
        content.next_line(MARGIN, 28.0);
        content.show(Str(&win_ansi(&footer)));
        content.end_text();
        let page_id = page_ids[i];
        let content_id = Ref::new(page_id.get() + 1);
        let mut page = pdf.page(page_id);
        page.media_box(Rect::new(0.0, 0.0, PAGE_W, PAGE_H));
        page.parent(tree);
        page.contents(content_id);
        page.resources()
            .fonts()
            .pair(REGULAR, regular)
            .pair(BOLD, bold);
        page.finish();
        let data = content.finish();
        pdf.stream(content_id, &data);
    }
    let _ = Filter::FlateDecode; // streams stay uncompressed: plain text a reviewer can grep
    pdf.finish()
}
