//! A drawing backend that wraps plotters' SVG backend and remembers, for every SVG element the
//! inner backend writes, the class the plot had set at the time; [`apply_classes`] then writes
//! those classes into the finished document so tests (and style sheets) can find each part.
//!
//! plotters' SVG backend writes exactly one element per call of `draw_pixel`, `draw_line`,
//! `draw_rect`, `draw_path`, `draw_circle`, `fill_polygon` and `draw_text`, and nothing when the
//! colour is fully transparent; the wrapper mirrors that rule. [`apply_classes`] refuses a
//! document whose element count does not match, so a change in plotters shows up as an error,
//! never as wrong classes.

use std::cell::RefCell;
use std::rc::Rc;

use plotters::prelude::{DrawingBackend, SVGBackend};
use plotters_backend::{
    BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingErrorKind,
};

use crate::report::escape::xml_chars;

/// The class in force and the classes recorded so far, shared between the plot and the backend.
#[derive(Clone, Debug, Default)]
pub(crate) struct Tags {
    current: Rc<RefCell<Option<String>>>,
    recorded: Rc<RefCell<Vec<Option<String>>>>,
    scope: Rc<RefCell<Option<&'static str>>>,
}

impl Tags {
    /// Elements drawn from now on carry `class` (`None`: no class).
    /// With a scope set (see [`Tags::scope`]) the element carries both classes.
    pub(crate) fn set(&self, class: Option<&'static str>) {
        let scope = *self.scope.borrow();
        *self.current.borrow_mut() = match (class, scope) {
            (Some(c), Some(s)) => Some(format!("{c} {s}")),
            (Some(c), None) => Some(c.to_string()),
            (None, Some(s)) => Some(s.to_string()),
            (None, None) => None,
        };
    }

    /// A second class added to every class set from now on (`None`: no second class).
    pub(crate) fn scope(&self, scope: Option<&'static str>) {
        *self.scope.borrow_mut() = scope;
    }

    fn record(&self, color: BackendColor) {
        if color.alpha != 0.0 {
            let c = self.current.borrow().clone();
            self.recorded.borrow_mut().push(c);
        }
    }

    /// The classes recorded, one per element written.
    pub(crate) fn recorded(&self) -> Vec<Option<String>> {
        self.recorded.borrow().clone()
    }
}

/// plotters' SVG backend plus the class bookkeeping.
pub(crate) struct TaggedSvg<'a> {
    inner: SVGBackend<'a>,
    tags: Tags,
}

impl<'a> TaggedSvg<'a> {
    pub(crate) fn new(buf: &'a mut String, size: (u32, u32), tags: Tags) -> Self {
        TaggedSvg {
            inner: SVGBackend::with_string(buf, size),
            tags,
        }
    }
}

type Res = Result<(), DrawingErrorKind<std::io::Error>>;

impl DrawingBackend for TaggedSvg<'_> {
    type ErrorType = std::io::Error;

    fn get_size(&self) -> (u32, u32) {
        self.inner.get_size()
    }

    fn ensure_prepared(&mut self) -> Res {
        self.inner.ensure_prepared()
    }

    fn present(&mut self) -> Res {
        self.inner.present()
    }

    fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Res {
        self.tags.record(color);
        self.inner.draw_pixel(point, color)
    }

    fn draw_line<S: BackendStyle>(
        &mut self,
        from: BackendCoord,
        to: BackendCoord,
        style: &S,
    ) -> Res {
        self.tags.record(style.color());
        self.inner.draw_line(from, to, style)
    }

    fn draw_rect<S: BackendStyle>(
        &mut self,
        upper_left: BackendCoord,
        bottom_right: BackendCoord,
        style: &S,
        fill: bool,
    ) -> Res {
        self.tags.record(style.color());
        self.inner.draw_rect(upper_left, bottom_right, style, fill)
    }

    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        style: &S,
    ) -> Res {
        self.tags.record(style.color());
        self.inner.draw_path(path, style)
    }

    fn draw_circle<S: BackendStyle>(
        &mut self,
        center: BackendCoord,
        radius: u32,
        style: &S,
        fill: bool,
    ) -> Res {
        self.tags.record(style.color());
        self.inner.draw_circle(center, radius, style, fill)
    }

    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        style: &S,
    ) -> Res {
        self.tags.record(style.color());
        self.inner.fill_polygon(vert, style)
    }

    /// plotters escapes `&`, `<`, `>` and quotes but passes every other character raw; control
    /// characters (most of which XML forbids) and bidi controls are shown escaped first, so
    /// every document is well-formed and shows what a name held.
    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Res {
        self.tags.record(style.color());
        self.inner.draw_text(&xml_chars(text), style, pos)
    }

    fn estimate_text_size<T: BackendTextStyle>(
        &self,
        text: &str,
        style: &T,
    ) -> Result<(u32, u32), DrawingErrorKind<Self::ErrorType>> {
        self.inner.estimate_text_size(&xml_chars(text), style)
    }
}

/// Write `class="..."` into each element of `svg` (the elements below the root, in document
/// order) from `classes`. Every element starts its own line in plotters' output; text content is
/// escaped, so a line that starts with `<` and not `</` opens an element.
pub(crate) fn apply_classes(svg: &str, classes: &[Option<String>]) -> Result<String, String> {
    let mut out = String::with_capacity(svg.len() + classes.len() * 24);
    let mut next = classes.iter();
    let mut seen_root = false;
    let mut count = 0usize;
    for line in svg.split_inclusive('\n') {
        let opens = line.starts_with('<') && !line.starts_with("</");
        if opens && !seen_root {
            seen_root = true;
            out.push_str(line);
            continue;
        }
        if !opens {
            out.push_str(line);
            continue;
        }
        count += 1;
        let class = next.next().ok_or_else(|| {
            format!(
                "plot: the SVG has more elements than were drawn ({} recorded); the plotters SVG backend changed",
                classes.len()
            )
        })?;
        let split = line
            .find([' ', '/', '>'])
            .and_then(|at| line.split_at_checked(at));
        match (class, split) {
            (Some(c), Some((tag, rest))) => {
                out.push_str(tag);
                out.push_str(" class=\"");
                out.push_str(c);
                out.push('"');
                out.push_str(rest);
            }
            _ => out.push_str(line),
        }
    }
    if count != classes.len() {
        return Err(format!(
            "plot: the SVG has {count} elements but {} were drawn; the plotters SVG backend changed",
            classes.len()
        ));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classes_go_to_elements_in_order_and_counts_must_match() {
        let svg =
            "<svg width=\"1\">\n<line x1=\"0\"/>\n<text x=\"1\">\na &lt; b\n</text>\n</svg>\n";
        let a = || Some("a".to_string());
        let out = apply_classes(svg, &[a(), None]).expect("counts match");
        assert!(out.contains("<line class=\"a\" x1=\"0\"/>"));
        assert!(out.contains("<text x=\"1\">"));
        assert!(apply_classes(svg, &[a()]).is_err());
        assert!(apply_classes(svg, &[a(), None, None]).is_err());
    }

    #[test]
    fn scope_adds_a_second_class() {
        let tags = Tags::default();
        tags.set(Some("x"));
        tags.record(BackendColor {
            alpha: 1.0,
            rgb: (0, 0, 0),
        });
        tags.scope(Some("z"));
        tags.set(Some("x"));
        tags.record(BackendColor {
            alpha: 1.0,
            rgb: (0, 0, 0),
        });
        // Fully transparent drawings write nothing and are not recorded.
        tags.record(BackendColor {
            alpha: 0.0,
            rgb: (0, 0, 0),
        });
        assert_eq!(
            tags.recorded(),
            vec![Some("x".to_string()), Some("x z".to_string())]
        );
    }
}
