//! Drawing at a higher resolution without changing a figure's layout: a drawing backend that
//! shows the plotting code the figure's layout size (in layout pixels, 96 per inch) and draws into
//! an inner backend `scale` times larger, scaling every coordinate, line width, circle radius and
//! font size. `--dpi 300` thus gives the same figure, with its text and lines in the same places,
//! in 3.125 × the pixels.
use plotters::style::{FontDesc, TextStyle};
use plotters_backend::{
    BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind,
};

/// Layout pixels per inch: the figures' sizes and fonts are chosen for this density.
pub const LAYOUT_DPI: f64 = 96.0;

/// A backend drawing a `size` layout into `inner`, which is `scale` times larger.
pub struct Scaled<B> {
    inner: B,
    size: (u32, u32),
    scale: f64,
}

impl<B: DrawingBackend> Scaled<B> {
    /// Wrap `inner`; its size must be `size` × `scale` (rounded).
    pub fn new(inner: B, size: (u32, u32), scale: f64) -> Self {
        Self { inner, size, scale }
    }

    fn p(&self, (x, y): BackendCoord) -> BackendCoord {
        (
            (x as f64 * self.scale).round() as i32,
            (y as f64 * self.scale).round() as i32,
        )
    }
}

/// The physical pixel count of `n` layout pixels at `scale`.
pub fn physical(n: u32, scale: f64) -> u32 {
    ((n as f64 * scale).round() as u32).max(1)
}

/// A line style with its width scaled.
struct Wide {
    color: BackendColor,
    width: u32,
}

impl BackendStyle for Wide {
    fn color(&self) -> BackendColor {
        self.color
    }
    fn stroke_width(&self) -> u32 {
        self.width
    }
}

impl<B: DrawingBackend> Scaled<B> {
    fn wide<S: BackendStyle>(&self, s: &S) -> Wide {
        Wide {
            color: s.color(),
            width: ((s.stroke_width() as f64 * self.scale).round() as u32).max(1),
        }
    }

    /// The text style at the physical font size.
    fn font<'a, T: BackendTextStyle>(&self, s: &'a T) -> TextStyle<'a> {
        let font =
            FontDesc::new(s.family(), s.size() * self.scale, s.style()).transform(s.transform());
        TextStyle {
            font,
            color: s.color(),
            pos: s.anchor(),
        }
    }
}

impl<B: DrawingBackend> DrawingBackend for Scaled<B> {
    type ErrorType = B::ErrorType;

    fn get_size(&self) -> (u32, u32) {
        self.size
    }

    fn ensure_prepared(&mut self) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        self.inner.ensure_prepared()
    }

    fn present(&mut self) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        self.inner.present()
    }

    fn draw_pixel(
        &mut self,
        point: BackendCoord,
        color: BackendColor,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        // The bitmap backend fills [upper left, bottom right): the layout pixel's square.
        let (a, b) = (self.p(point), self.p((point.0 + 1, point.1 + 1)));
        self.inner.draw_rect(a, b, &color, true)
    }

    fn draw_line<S: BackendStyle>(
        &mut self,
        from: BackendCoord,
        to: BackendCoord,
        style: &S,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let w = self.wide(style);
        self.inner.draw_line(self.p(from), self.p(to), &w)
    }

    fn draw_rect<S: BackendStyle>(
        &mut self,
        upper_left: BackendCoord,
        bottom_right: BackendCoord,
        style: &S,
        fill: bool,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let w = self.wide(style);
        self.inner
            .draw_rect(self.p(upper_left), self.p(bottom_right), &w, fill)
    }

    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        style: &S,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let w = self.wide(style);
        let pts: Vec<BackendCoord> = path.into_iter().map(|p| self.p(p)).collect();
        self.inner.draw_path(pts, &w)
    }

    fn draw_circle<S: BackendStyle>(
        &mut self,
        center: BackendCoord,
        radius: u32,
        style: &S,
        fill: bool,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let w = self.wide(style);
        let r = (radius as f64 * self.scale).round() as u32;
        self.inner.draw_circle(self.p(center), r, &w, fill)
    }

    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        style: &S,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let c = style.color();
        let pts: Vec<BackendCoord> = vert.into_iter().map(|p| self.p(p)).collect();
        self.inner.fill_polygon(pts, &c)
    }

    fn draw_text<T: BackendTextStyle>(
        &mut self,
        text: &str,
        style: &T,
        pos: BackendCoord,
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        let f = self.font(style);
        self.inner.draw_text(text, &f, self.p(pos))
    }

    fn estimate_text_size<T: BackendTextStyle>(
        &self,
        text: &str,
        style: &T,
    ) -> Result<(u32, u32), DrawingErrorKind<Self::ErrorType>> {
        let f = self.font(style);
        let (w, h) = self.inner.estimate_text_size(text, &f)?;
        Ok((
            (w as f64 / self.scale).ceil() as u32,
            (h as f64 / self.scale).ceil() as u32,
        ))
    }

    fn blit_bitmap(
        &mut self,
        pos: BackendCoord,
        (iw, ih): (u32, u32),
        src: &[u8],
    ) -> Result<(), DrawingErrorKind<Self::ErrorType>> {
        if self.scale == 1.0 {
            return self.inner.blit_bitmap(pos, (iw, ih), src);
        }
        let (w, h) = (physical(iw, self.scale), physical(ih, self.scale));
        let img = resample(src, (iw, ih), (w, h));
        self.inner.blit_bitmap(self.p(pos), (w, h), &img)
    }
}

/// Bilinear resampling of an RGB image (pixel centres matched) from `(iw, ih)` to `(w, h)`.
pub fn resample(src: &[u8], (iw, ih): (u32, u32), (w, h): (u32, u32)) -> Vec<u8> {
    let (iw, ih, w, h) = (iw as usize, ih as usize, w as usize, h as usize);
    let mut out = vec![0u8; w * h * 3];
    if iw == 0 || ih == 0 {
        return out;
    }
    // Source coordinate of a target pixel's centre; the two neighbours and weight.
    let axis = |n: usize, m: usize| -> Vec<(usize, usize, f64)> {
        (0..n)
            .map(|i| {
                let s = ((i as f64 + 0.5) * m as f64 / n as f64 - 0.5).clamp(0.0, (m - 1) as f64);
                let a = s.floor() as usize;
                let b = (a + 1).min(m - 1);
                (a, b, s - a as f64)
            })
            .collect()
    };
    let (xs, ys) = (axis(w, iw), axis(h, ih));
    for (j, &(y0, y1, fy)) in ys.iter().enumerate() {
        for (i, &(x0, x1, fx)) in xs.iter().enumerate() {
            for c in 0..3 {
                let v = |x: usize, y: usize| src[(y * iw + x) * 3 + c] as f64;
                let top = v(x0, y0) * (1.0 - fx) + v(x1, y0) * fx;
                let bot = v(x0, y1) * (1.0 - fx) + v(x1, y1) * fx;
                out[(j * w + i) * 3 + c] = (top * (1.0 - fy) + bot * fy).round() as u8;
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use plotters::prelude::*;

    /// At scale 1 the wrapper draws exactly what the bare backend draws (common practice: an
    /// identity transform must not change an image).
    #[test]
    fn scale_one_is_identity() {
        crate::plot::register_fonts();
        fn draw<B: DrawingBackend>(root: &DrawingArea<B, plotters::coord::Shift>) {
            root.fill(&WHITE).unwrap();
            root.draw(&Rectangle::new([(10, 10), (40, 30)], RED.filled()))
                .unwrap();
            root.draw(&Rectangle::new(
                [(5, 5), (20, 25)],
                ShapeStyle::from(&GREEN).stroke_width(2),
            ))
            .unwrap();
            root.draw(&PathElement::new(
                vec![(0, 0), (60, 50)],
                ShapeStyle::from(&BLUE).stroke_width(2),
            ))
            .unwrap();
            root.draw(&Circle::new((30, 30), 5, BLACK)).unwrap();
            root.draw(&Text::new(
                "Frost 1 °C",
                (2, 30),
                ("sans-serif", 12).into_font(),
            ))
            .unwrap();
        }
        let (mut a, mut b) = (vec![0u8; 64 * 48 * 3], vec![0u8; 64 * 48 * 3]);
        {
            let r = BitMapBackend::with_buffer(&mut a, (64, 48)).into_drawing_area();
            draw(&r);
        }
        {
            let inner = BitMapBackend::with_buffer(&mut b, (64, 48));
            let r = Scaled::new(inner, (64, 48), 1.0).into_drawing_area();
            draw(&r);
        }
        assert!(a == b);
    }

    /// At scale 3 a filled layout rectangle covers exactly 3 × its physical pixels (the
    /// layout-to-physical map is x ↦ round(3x); the bitmap backend fills [from, to)).
    #[test]
    fn scale_three_covers_rectangles_exactly() {
        let mut b = vec![0u8; 30 * 30 * 3];
        {
            let inner = BitMapBackend::with_buffer(&mut b, (30, 30));
            let r = Scaled::new(inner, (10, 10), 3.0).into_drawing_area();
            r.fill(&WHITE).unwrap();
            r.draw(&Rectangle::new([(2, 3), (4, 5)], BLACK.filled()))
                .unwrap();
        }
        let black = (0..30 * 30)
            .filter(|k| b[k * 3] == 0)
            .map(|k| (k % 30, k / 30))
            .collect::<Vec<_>>();
        assert_eq!(black.len(), 6 * 6);
        assert!(black
            .iter()
            .all(|&(x, y)| (6..12).contains(&x) && (9..15).contains(&y)));
    }

    /// Bilinear resampling keeps a linear ramp linear (exact for a linear function, up to rounding).
    #[test]
    fn resampling_a_ramp() {
        let src: Vec<u8> = (0..4).flat_map(|x| [x as u8 * 60; 3]).collect();
        let out = resample(&src, (4, 1), (8, 1));
        let r: Vec<u8> = out.chunks(3).map(|c| c[0]).collect();
        assert_eq!(r, vec![0, 15, 45, 75, 105, 135, 165, 180]);
    }
}
