//! The MOSFET's picture, as data: drain current against VDS with the RDS(on) line at the cold
//! corner and hot (at the junction temperature the analysis found), the load line at the
//! highest supply and the worst-case operating point; a zoom on the on-state beside it.

use super::{detail, NmosPart};
use crate::conditions::Conditions;
use crate::drive::{Corner, DriveAnalysis};
use crate::picture::{Axis, Curve, Layout, Marker, Panel, Picture, Style};
use crate::quantity::{format_engineering as fe, Base};

/// The classes written into the SVG elements.
pub mod class {
    /// The RDS(on) line at the cold corner.
    pub const RDS_COLD: &str = "pinlow-rds-cold";
    /// The RDS(on) line hot (at the worst junction temperature).
    pub const RDS_HOT: &str = "pinlow-rds-hot";
    /// The load line at the worst-case corner.
    pub const LOAD_LINE_WORST: &str = "pinlow-load-line-worst";
    /// The worst-case operating point.
    pub const POINT_WORST: &str = "pinlow-point-worst";
    /// Second class of the zoom panel's elements.
    pub const ZOOM: &str = "pinlow-zoom";
}

/// The on-state picture; `Err` when the load draws nothing.
pub fn picture(
    part: &NmosPart,
    c: &Conditions,
    load: &Corner,
    a: &DriveAnalysis,
) -> Result<Picture, String> {
    let d = detail(a).ok_or("not an nmos analysis")?;
    let w = &d.worst;
    let id = w.id_max.base();
    let vcc = load.vcc_max.base();
    if !(id > 0.0 && id.is_finite() && vcc > 0.0) {
        return Err(
            "the load draws no current at the worst-case corner; there is no on-state to draw"
                .into(),
        );
    }
    let rds_cold = part
        .rds_at(w.point.ohms, c.ambient_min)
        .base()
        .max(w.point.ohms.base() * 0.1);
    let rds_hot = w
        .rds_max
        .unwrap_or_else(|| part.rds_at(w.point.ohms, part.info.tj_max))
        .base();
    let von = w.von_for_loads.base();
    let panel = |x_max: f64, caption: String, zoom: bool| {
        let y_max = 1.6 * id * 1e3;
        let mut p = Panel::new(
            caption,
            Axis {
                title: "VDS [V]".into(),
                min: 0.0,
                max: x_max,
            },
            Axis {
                title: "ID [mA]".into(),
                min: 0.0,
                max: y_max,
            },
        );
        let line = |r: f64| {
            let x_end = x_max.min(y_max / 1e3 * r);
            vec![(0.0, 0.0), (x_end, x_end / r * 1e3)]
        };
        p.curves.push(Curve {
            class: class::RDS_COLD,
            label: Some(format!(
                "RDS(on) {} at the coldest ambient",
                fe(rds_cold, "Ω")
            )),
            points: line(rds_cold),
            style: Style::Nominal,
        });
        p.curves.push(Curve {
            class: class::RDS_HOT,
            label: Some(format!("RDS(on) {} hot (worst junction)", fe(rds_hot, "Ω"))),
            points: line(rds_hot),
            style: Style::Worst,
        });
        let x_end = vcc.min(x_max);
        p.curves.push(Curve {
            class: class::LOAD_LINE_WORST,
            label: Some(format!("load line, highest supply {}", fe(vcc, "V"))),
            points: vec![(0.0, id * 1e3), (x_end, id * (1.0 - x_end / vcc) * 1e3)],
            style: Style::LoadWorst,
        });
        if von <= x_max {
            p.markers.push(Marker {
                class: class::POINT_WORST,
                label: format!("worst-case point: {} at {}", fe(von, "V"), fe(id, "A")),
                x: von,
                y: id * 1e3,
                style: Style::PointWorst,
            });
        }
        if !w.pinned && !zoom {
            p.notes
                .push("the gate drive is too low: the channel may sit in its linear region".into());
        }
        if zoom {
            p.extra_class = Some(class::ZOOM);
        }
        p
    };
    let zoom_x = (4.0 * von).max(0.2).min(vcc * 1.05);
    Ok(Picture {
        layout: Layout::SideBySide,
        panels: vec![
            panel(vcc * 1.05, format!("on state ({})", part.info.id), false),
            panel(zoom_x, "zoom on the on-voltage".into(), true),
        ],
    })
}
