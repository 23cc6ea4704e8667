//! The data of a stage's picture: panels of curves, points, shaded bands and levels in plain
//! display units. A drive kind builds its picture from its analysis; `plot` only draws it.

/// How a mark is drawn: each style has one colour and line form in the renderer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Style {
    /// Curves of the part at 25 °C.
    Nominal,
    /// The part at the worst-case corner.
    Worst,
    /// A load line at nominal supply.
    Load,
    /// A load line at the worst-case corner.
    LoadWorst,
    /// The nominal operating point.
    PointNominal,
    /// The worst-case operating point.
    PointWorst,
    /// A target level that passes.
    Target,
    /// The edge below which the stage fails.
    Edge,
    /// A shaded region of good operation.
    Region,
    /// A plain data curve.
    Data,
}

/// One axis: title with unit, and the range shown.
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    /// Title with its unit (`VCE [V]`).
    pub title: String,
    /// Lowest value shown.
    pub min: f64,
    /// Highest value shown.
    pub max: f64,
}

/// A curve through points.
#[derive(Clone, Debug, PartialEq)]
pub struct Curve {
    /// SVG class of its elements.
    pub class: &'static str,
    /// Legend text (none: not in the legend).
    pub label: Option<String>,
    /// (x, y) in axis units.
    pub points: Vec<(f64, f64)>,
    /// How it is drawn.
    pub style: Style,
}

/// A marked point.
#[derive(Clone, Debug, PartialEq)]
pub struct Marker {
    /// SVG class of its elements.
    pub class: &'static str,
    /// Legend text.
    pub label: String,
    /// x in axis units.
    pub x: f64,
    /// y in axis units.
    pub y: f64,
    /// How it is drawn.
    pub style: Style,
}

/// A shaded band between two x values, full height.
#[derive(Clone, Debug, PartialEq)]
pub struct Band {
    /// SVG class of its elements.
    pub class: &'static str,
    /// Legend text.
    pub label: String,
    /// Left edge.
    pub x0: f64,
    /// Right edge.
    pub x1: f64,
    /// How it is drawn.
    pub style: Style,
}

/// A horizontal level line.
#[derive(Clone, Debug, PartialEq)]
pub struct Level {
    /// SVG class of its elements.
    pub class: &'static str,
    /// Legend text.
    pub label: String,
    /// y in axis units.
    pub y: f64,
    /// How it is drawn.
    pub style: Style,
}

/// One panel of the picture.
#[derive(Clone, Debug, PartialEq)]
pub struct Panel {
    /// Caption above the panel.
    pub caption: String,
    /// Horizontal axis.
    pub x: Axis,
    /// Vertical axis.
    pub y: Axis,
    /// Shaded bands (drawn first).
    pub bands: Vec<Band>,
    /// Level lines.
    pub levels: Vec<Level>,
    /// Curves.
    pub curves: Vec<Curve>,
    /// Marked points (drawn last).
    pub markers: Vec<Marker>,
    /// Notes written inside the panel.
    pub notes: Vec<String>,
    /// Second class for every element of this panel (e.g. a zoom), when it has one.
    pub extra_class: Option<&'static str>,
}

impl Panel {
    /// An empty panel with these axes.
    pub fn new(caption: impl Into<String>, x: Axis, y: Axis) -> Panel {
        Panel {
            caption: caption.into(),
            x,
            y,
            bands: Vec::new(),
            levels: Vec::new(),
            curves: Vec::new(),
            markers: Vec::new(),
            notes: Vec::new(),
            extra_class: None,
        }
    }
}

/// Where the panels go.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Layout {
    /// One panel over the whole picture.
    Single,
    /// Two panels side by side.
    SideBySide,
    /// A tall left panel over a short one, and one panel on the right.
    LeftStackRight,
}

/// A stage's picture.
#[derive(Clone, Debug, PartialEq)]
pub struct Picture {
    /// Where the panels go.
    pub layout: Layout,
    /// The panels in layout order.
    pub panels: Vec<Panel>,
}
