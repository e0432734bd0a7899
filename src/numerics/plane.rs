//! Planar geometry in double precision for laying out paths in the z-plane (the exact values
//! are computed along the paths; only their layout uses f64).

/// Distance from p to the segment [a, b] in the plane (to a when a = b).
pub fn segment_distance(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    let len2 = dx * dx + dy * dy;
    let t = if len2 > 0.0 {
        (((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((a[0] + t * dx - p[0]).powi(2) + (a[1] + t * dy - p[1]).powi(2)).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn distances_to_a_segment() {
        assert_eq!(segment_distance([0.0, 1.0], [-1.0, 0.0], [1.0, 0.0]), 1.0);
        assert_eq!(segment_distance([3.0, 4.0], [0.0, 0.0], [0.0, 0.0]), 5.0);
        assert_eq!(segment_distance([2.0, 0.0], [-1.0, 0.0], [1.0, 0.0]), 1.0);
    }
}
