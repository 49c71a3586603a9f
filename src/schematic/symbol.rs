//! Placing a symbol: which of its library pins belong to the placed unit and body style, and
//! where each pin's connection point lands on the sheet under the symbol's rotation and
//! mirroring.
//!
//! A library symbol is drawn with y pointing up; the sheet's y points down. The placement is
//! a 2x2 matrix `(x1 y1; x2 y2)` applied as `X = x1*x + y1*y`, `Y = x2*x + y2*y`, then moved
//! to the symbol's position. Rotation is counter-clockwise on the sheet; a mirror acts after
//! the rotation (`(mirror x)` flips the sheet's y, `(mirror y)` its x).

use super::sheet::{LibPin, LibSym, Placed, Pt};

/// The placement matrix `(x1, y1, x2, y2)`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Transform(pub i64, pub i64, pub i64, pub i64);

impl Transform {
    /// The matrix for `(at x y rot)` and an optional mirror.
    pub fn of(rot: i32, mirror_x: bool, mirror_y: bool) -> Transform {
        let m = match rot.rem_euclid(360) {
            90 => Transform(0, -1, -1, 0),
            180 => Transform(-1, 0, 0, 1),
            270 => Transform(0, 1, 1, 0),
            _ => Transform(1, 0, 0, -1),
        };
        let t = if mirror_x {
            Some(Transform(1, 0, 0, -1))
        } else if mirror_y {
            Some(Transform(-1, 0, 0, 1))
        } else {
            None
        };
        match t {
            None => m,
            // the mirror flips the sheet's axis after the rotation
            Some(t) => Transform(
                m.0 * t.0 + m.2 * t.1,
                m.1 * t.0 + m.3 * t.1,
                m.0 * t.2 + m.2 * t.3,
                m.1 * t.2 + m.3 * t.3,
            ),
        }
    }

    pub fn apply(self, p: Pt) -> Pt {
        (self.0 * p.0 + self.1 * p.1, self.2 * p.0 + self.3 * p.1)
    }
}

/// The library pins of `sym` that the placed unit and body style show.
pub fn unit_pins<'s, 'a>(
    sym: &'s LibSym<'a>,
    unit: u32,
    style: u32,
) -> impl Iterator<Item = &'s LibPin<'a>> {
    sym.pins
        .iter()
        .filter(move |p| (p.unit == 0 || p.unit == unit) && (p.style == 0 || p.style == style))
}

/// Where a library pin's connection point lands on the sheet.
pub fn pin_point(placed: &Placed<'_>, pin: &LibPin<'_>) -> Pt {
    let t = Transform::of(placed.rot, placed.mirror_x, placed.mirror_y);
    let d = t.apply(pin.at);
    (placed.at.0 + d.0, placed.at.1 + d.1)
}

/// KiCad's letter suffix for unit `unit` (1 is `A`, 26 is `Z`, 27 is `AA`).
pub fn unit_letters(unit: u32) -> String {
    let mut n = unit.max(1);
    let mut out = Vec::new();
    while n > 0 {
        let r = (n - 1) % 26;
        out.push(b'A' + r as u8);
        n = (n - 1) / 26;
    }
    out.reverse();
    String::from_utf8(out).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rotation_is_counter_clockwise_on_the_sheet() {
        // a pin one unit to the right of the origin in the library (y up)
        let p = (10, 0);
        assert_eq!(Transform::of(0, false, false).apply(p), (10, 0));
        // turned a quarter counter-clockwise it points up, which is -y on the sheet
        assert_eq!(Transform::of(90, false, false).apply(p), (0, -10));
        assert_eq!(Transform::of(180, false, false).apply(p), (-10, 0));
        assert_eq!(Transform::of(270, false, false).apply(p), (0, 10));
        // a pin above the origin in the library is above it on the sheet, turned to the
        // left at 90, below at 180, to the right at 270
        assert_eq!(Transform::of(0, false, false).apply((0, 10)), (0, -10));
        assert_eq!(Transform::of(90, false, false).apply((0, 10)), (-10, 0));
        assert_eq!(Transform::of(180, false, false).apply((0, 10)), (0, 10));
        assert_eq!(Transform::of(270, false, false).apply((0, 10)), (10, 0));
    }

    #[test]
    fn mirrors_flip_the_sheet_axes() {
        // mirror y: left and right swap
        assert_eq!(Transform::of(0, false, true).apply((10, 0)), (-10, 0));
        assert_eq!(Transform::of(0, false, true).apply((0, 10)), (0, -10));
        // mirror x: up and down swap
        assert_eq!(Transform::of(0, true, false).apply((0, 10)), (0, 10));
        assert_eq!(Transform::of(0, true, false).apply((10, 0)), (10, 0));
        // turned, then mirrored on the sheet: a pin pointing up, turned to 90 (left), then
        // mirrored in y, points right; turned to 90 and mirrored in x, a pin pointing
        // right (now up) points down
        assert_eq!(Transform::of(90, false, true).apply((0, 10)), (10, 0));
        assert_eq!(Transform::of(90, true, false).apply((10, 0)), (0, 10));
        assert_eq!(Transform::of(270, true, false).apply((0, 10)), (10, 0));
    }

    #[test]
    fn unit_letters_run_past_z() {
        assert_eq!(unit_letters(1), "A");
        assert_eq!(unit_letters(26), "Z");
        assert_eq!(unit_letters(27), "AA");
    }
}
