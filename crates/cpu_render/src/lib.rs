//! A CPU renderer for egui frames, for image snapshots on machines without a GPU.
//!
//! egui hands a renderer triangle meshes (positions, texture coordinates, premultiplied vertex
//! colors) and texture updates; this draws them into an RGBA image with premultiplied alpha
//! blending, nearest-texel sampling and egui's own clip rectangles. It is not a faithful copy of
//! a GPU rasterizer (no multisampling, blending in gamma space as egui's own renderers do), so
//! snapshots taken with it are compared only with snapshots taken with it.

use std::collections::HashMap;

use eframe::egui::{self, Color32, ColorImage, ImageData, TextureId, TexturesDelta};
use egui_kittest::TestRenderer;

/// Renders frames into images on the CPU.
#[derive(Default)]
pub struct CpuRenderer {
    textures: HashMap<TextureId, ColorImage>,
}

impl CpuRenderer {
    /// A renderer with no textures yet.
    #[must_use]
    pub fn new() -> Self {
        Self::default()
    }

    fn sample(&self, texture: TextureId, uv: egui::Pos2) -> [f32; 4] {
        let Some(image) = self.textures.get(&texture) else {
            return [1.0; 4];
        };
        let [w, h] = image.size;
        if w == 0 || h == 0 {
            return [1.0; 4];
        }
        let x = ((uv.x * w as f32) as usize).min(w - 1);
        let y = ((uv.y * h as f32) as usize).min(h - 1);
        let c = image.pixels[y * w + x];
        [
            f32::from(c.r()) / 255.0,
            f32::from(c.g()) / 255.0,
            f32::from(c.b()) / 255.0,
            f32::from(c.a()) / 255.0,
        ]
    }
}

fn color(c: Color32) -> [f32; 4] {
    [
        f32::from(c.r()) / 255.0,
        f32::from(c.g()) / 255.0,
        f32::from(c.b()) / 255.0,
        f32::from(c.a()) / 255.0,
    ]
}

impl TestRenderer for CpuRenderer {
    fn handle_delta(&mut self, delta: &mut TexturesDelta) {
        for (id, updates) in &delta.set {
            for update in updates {
                self.apply(*id, update);
            }
        }
        for id in &delta.free {
            self.textures.remove(id);
        }
        // Handled: egui checks that no texture update is dropped unapplied.
        delta.clear();
    }

    fn render(
        &mut self,
        ctx: &egui::Context,
        output: &egui::FullOutput,
    ) -> Result<image::RgbaImage, String> {
        let ppp = output.pixels_per_point;
        let screen = ctx.content_rect();
        let (width, height) = (
            (screen.width() * ppp).round() as usize,
            (screen.height() * ppp).round() as usize,
        );
        let background = color(ctx.global_style().visuals.panel_fill);
        let mut canvas = vec![background; width * height];
        let primitives = ctx.tessellate(output.shapes.clone(), ppp);
        for p in &primitives {
            let egui::epaint::Primitive::Mesh(mesh) = &p.primitive else {
                return Err("paint callbacks cannot be drawn on the CPU".into());
            };
            let clip = p.clip_rect;
            let clip = [
                (clip.min.x * ppp).max(0.0),
                (clip.min.y * ppp).max(0.0),
                (clip.max.x * ppp).min(width as f32),
                (clip.max.y * ppp).min(height as f32),
            ];
            for tri in mesh.indices.chunks_exact(3) {
                let v = [
                    &mesh.vertices[tri[0] as usize],
                    &mesh.vertices[tri[1] as usize],
                    &mesh.vertices[tri[2] as usize],
                ];
                self.triangle(&mut canvas, width, clip, ppp, mesh.texture_id, v);
            }
        }
        let mut bytes = Vec::with_capacity(width * height * 4);
        for px in canvas {
            // Premultiplied over an opaque background: the result is opaque.
            for c in px {
                bytes.push((c.clamp(0.0, 1.0) * 255.0).round() as u8);
            }
        }
        image::RgbaImage::from_raw(width as u32, height as u32, bytes)
            .ok_or_else(|| "image size mismatch".to_owned())
    }
}

impl CpuRenderer {
    /// Applies one texture update: a whole image, or a patch at `pos`.
    fn apply(&mut self, id: TextureId, update: &egui::epaint::ImageDelta) {
        let ImageData::Color(image) = &update.image;
        match update.pos {
            None => {
                self.textures.insert(id, (**image).clone());
            }
            Some([x0, y0]) => {
                if let Some(target) = self.textures.get_mut(&id) {
                    let [w, h] = target.size;
                    for y in 0..image.size[1] {
                        for x in 0..image.size[0] {
                            let (tx, ty) = (x0 + x, y0 + y);
                            if tx < w && ty < h {
                                target.pixels[ty * w + tx] = image.pixels[y * image.size[0] + x];
                            }
                        }
                    }
                }
            }
        }
    }

    fn triangle(
        &self,
        canvas: &mut [[f32; 4]],
        width: usize,
        clip: [f32; 4],
        ppp: f32,
        texture: TextureId,
        v: [&egui::epaint::Vertex; 3],
    ) {
        let p: Vec<[f32; 2]> = v.iter().map(|v| [v.pos.x * ppp, v.pos.y * ppp]).collect();
        let area =
            (p[1][0] - p[0][0]) * (p[2][1] - p[0][1]) - (p[2][0] - p[0][0]) * (p[1][1] - p[0][1]);
        if area.abs() < 1e-9 {
            return;
        }
        let x0 = p
            .iter()
            .map(|q| q[0])
            .fold(f32::INFINITY, f32::min)
            .max(clip[0])
            .floor() as i64;
        let x1 = p
            .iter()
            .map(|q| q[0])
            .fold(f32::NEG_INFINITY, f32::max)
            .min(clip[2])
            .ceil() as i64;
        let y0 = p
            .iter()
            .map(|q| q[1])
            .fold(f32::INFINITY, f32::min)
            .max(clip[1])
            .floor() as i64;
        let y1 = p
            .iter()
            .map(|q| q[1])
            .fold(f32::NEG_INFINITY, f32::max)
            .min(clip[3])
            .ceil() as i64;
        let colors = [color(v[0].color), color(v[1].color), color(v[2].color)];
        for y in y0.max(0)..y1 {
            for x in x0.max(0)..x1 {
                let (px, py) = (x as f32 + 0.5, y as f32 + 0.5);
                if px < clip[0] || px >= clip[2] || py < clip[1] || py >= clip[3] {
                    continue;
                }
                let w0 = ((p[1][0] - px) * (p[2][1] - py) - (p[2][0] - px) * (p[1][1] - py)) / area;
                let w1 = ((p[2][0] - px) * (p[0][1] - py) - (p[0][0] - px) * (p[2][1] - py)) / area;
                let w2 = 1.0 - w0 - w1;
                if w0 < 0.0 || w1 < 0.0 || w2 < 0.0 {
                    continue;
                }
                let uv = egui::pos2(
                    w0 * v[0].uv.x + w1 * v[1].uv.x + w2 * v[2].uv.x,
                    w0 * v[0].uv.y + w1 * v[1].uv.y + w2 * v[2].uv.y,
                );
                let t = self.sample(texture, uv);
                let mut src = [0.0_f32; 4];
                for (k, s) in src.iter_mut().enumerate() {
                    *s = (w0 * colors[0][k] + w1 * colors[1][k] + w2 * colors[2][k]) * t[k];
                }
                let dst = &mut canvas[y as usize * width + x as usize];
                for k in 0..4 {
                    dst[k] = src[k] + dst[k] * (1.0 - src[3]);
                }
            }
        }
    }
}
