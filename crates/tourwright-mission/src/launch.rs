//! Launch figures: C3, the launch asymptote's declination and right ascension in the Earth
//! equatorial frame, the launch-vehicle table and the rocket equation.

use tourwright_astro::Vec3;
use tourwright_astro::constants::G0_M_S2;
use tourwright_astro::ephemeris::ecliptic_to_equatorial;

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
