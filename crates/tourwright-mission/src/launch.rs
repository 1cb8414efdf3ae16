//! Launch figures: C3, the launch asymptote's declination and right ascension in the Earth
//! equatorial frame, the launch-vehicle table and the rocket equation.

use tourwright_astro::Vec3;
use tourwright_astro::constants::G0_M_S2;
use tourwright_astro::ephemeris::{ecliptic_to_equatorial, equatorial_to_ecliptic};

use crate::design::LaunchVehicle;

/// C3 = v∞², km²/s².
#[inline]
pub fn c3(vinf: &Vec3) -> f64 {
    vinf.norm_squared()
}

/// Declination (DLA) and right ascension (RLA) of the outgoing asymptote, degrees, from a v∞
/// given in the ecliptic J2000 frame (rotated to the mean equator and equinox of J2000).
pub fn dla_rla_deg(vinf_ecliptic: &Vec3) -> (f64, f64) {
    let q = ecliptic_to_equatorial(vinf_ecliptic);
    let n = q.norm();
    if n == 0.0 {
        return (0.0, 0.0);
    }
    let dla = (q.z / n).clamp(-1.0, 1.0).asin().to_degrees();
    let rla = q.y.atan2(q.x).to_degrees().rem_euclid(360.0);
    (dla, rla)
}

/// The launch v∞ vector (ecliptic J2000) of magnitude `vinf` along the asymptote of right
/// ascension `rla_deg` and declination `dla_deg` (Earth mean equator J2000): the inverse of
/// [`dla_rla_deg`].
pub fn asymptote_vector(vinf: f64, rla_deg: f64, dla_deg: f64) -> Vec3 {
    let (sd, cd) = dla_deg.to_radians().sin_cos();
    let (sr, cr) = rla_deg.to_radians().sin_cos();
    equatorial_to_ecliptic(&Vec3::new(vinf * cd * cr, vinf * cd * sr, vinf * sd))
}

/// Injected mass at `c3` from the table by linear interpolation; `(mass, inside_table)`.
/// Outside the table the end segment is extrapolated (and the caller warns); never negative.
pub fn injected_mass(lv: &LaunchVehicle, c3: f64) -> Option<(f64, bool)> {
    let p = &lv.performance;
    match p.len() {
        0 => None,
        1 => Some((p[0].mass_kg, (c3 - p[0].c3_km2_s2).abs() < 1e-9)),
        n => {
            let inside = c3 >= p[0].c3_km2_s2 && c3 <= p[n - 1].c3_km2_s2;
            let k = p
                .windows(2)
                .position(|w| c3 <= w[1].c3_km2_s2)
                .unwrap_or(n - 2);
            let (a, b) = (p[k], p[k + 1]);
            let f = (c3 - a.c3_km2_s2) / (b.c3_km2_s2 - a.c3_km2_s2);
            Some(((a.mass_kg + f * (b.mass_kg - a.mass_kg)).max(0.0), inside))
        }
    }
}

/// Mass ratio m_final / m_initial of a burn of `dv_km_s` with specific impulse `isp_s`
/// (Tsiolkovsky).
#[inline]
pub fn mass_ratio(dv_km_s: f64, isp_s: f64) -> f64 {
    (-dv_km_s * 1000.0 / (isp_s * G0_M_S2)).exp()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn asymptote_vector_inverts_dla_rla() {
        for (rla, dla) in [(10.0, -28.5), (200.0, 45.0), (359.0, 0.0), (90.0, -80.0)] {
            let v = asymptote_vector(3.5, rla, dla);
            assert!((v.norm() - 3.5).abs() < 1e-12);
            let (d, r) = dla_rla_deg(&v);
            assert!(
                (d - dla).abs() < 1e-9 && (r - rla).abs() < 1e-9,
                "{rla} {dla}: {r} {d}"
            );
        }
    }
}
