//! The sun and shadows through the library's public face: scenes with a `location` and a
//! `sun` block, drawn and listed.

mod common;
use nalgebra::{Point3, Vector2, Vector3};
use pansite::aids::{angle_table, TableChoice};
use pansite::plane::{Equirect, ImagePoint};
use pansite::render::{draw, RenderSettings, SunChoice};
use pansite::scene::{parse_scene, LocalMoment, Site};
use pansite::sun::Sky;
use pansite::sun::{seen_shade, shadow_outlines, with_shadows, SHADOWS};
use pansite::visibility::DEPTH_BIAS;
use std::path::Path;

/// An invented square at an invented place (latitude 47.3, longitude 8.1), with a thin
/// pole 6 m tall at the origin and a standpoint south-west of it.
fn pole_scene(north: f64, sun: &str) -> Site {
    let text = pole_text(north, sun);
    parse_scene(text.as_bytes(), Path::new("pole.ron"), "pole").unwrap()
}

/// The text of [`pole_scene`]; its `sun` block (if any) on line 4, from column 13.
fn pole_text(north: f64, sun: &str) -> String {
    format!(
        r#"Scene(
            name: "pole",
            location: (latitude: 47.3, longitude: 8.1, north: {north}, time_zone: "Europe/Zurich"),
            {sun}
            standpoints: [(name: "corner", x: -9, y: -14, heading: 30)],
            items: [Block(label: "pole", at: Centre(0, 0), width: 0.02, depth: 0.02, height: 6)],
        )"#
    )
}

/// The corner of the shadows' outline farthest from the pole's foot, from `angles`' rows.
fn shadow_tip(site: &Site) -> pansite::aids::AngleRow {
    let map = Equirect::from_size_px(4096.0, 2048.0);
    let choice = TableChoice {
        item: Some(SHADOWS.to_owned()),
        points_only: false,
    };
    let rows = angle_table(site, &site.standpoints[0], &map, None, &choice);
    assert!(!rows.is_empty());
    rows.into_iter()
        .max_by(|a, b| a.at.coords.xy().norm().total_cmp(&b.at.coords.xy().norm()))
        .unwrap()
}

#[test]
fn a_poles_shadow_tip_is_where_trigonometry_puts_it_and_angles_lists_it() {
    // Plain trigonometry: a vertical pole of height h on level ground casts a shadow of
    // length h / tan(elevation) towards the sun's azimuth plus 180 degrees.
    let site = pole_scene(12.0, "");
    let sky = Sky::of_site(&site).unwrap();
    let moment = LocalMoment::parse("2026-05-04", "16:10").unwrap();
    let sun = sky.at(&moment).unwrap();
    let shadowed = with_shadows(&site, &sky.direction(&sun));
    let tip = shadow_tip(&shadowed);
    let length = 6.0 / sun.place.elevation_deg.to_radians().tan();
    // The plan's y axis is 12 degrees anticlockwise of true north.
    let bearing = (sun.place.azimuth_deg + 180.0 + 12.0).to_radians();
    let (x, y) = (length * bearing.sin(), length * bearing.cos());
    // The pole is 2 cm thick: its far corner lies within 2 cm of the line's tip.
    assert!(
        (tip.at.x - x).hypot(tip.at.y - y) < 0.02,
        "{:?} vs ({x}, {y})",
        tip.at
    );
    // And `angles` gives the azimuth and elevation the test finds from the eye itself.
    let eye = site.standpoints[0].eye();
    let (dx, dy, dz) = (x - eye.x, y - eye.y, -eye.z);
    let azimuth = dx.atan2(dy).to_degrees().rem_euclid(360.0);
    let elevation = dz.atan2(dx.hypot(dy)).to_degrees();
    assert!(
        (tip.azimuth_deg - azimuth).abs() < 0.1,
        "{} vs {azimuth}",
        tip.azimuth_deg
    );
    assert!((tip.elevation_deg - elevation).abs() < 0.1);
}

#[test]
fn at_transit_a_poles_shadow_points_to_true_north() {
    // Common practice: north of the Tropic of Cancer the noon shadow points true north;
    // the scene's plan is turned so that true north is 25 degrees clockwise of its y axis.
    let site = pole_scene(25.0, "");
    let sky = Sky::of_site(&site).unwrap();
    for date in ["2026-02-10", "2026-06-21", "2026-10-01"] {
        let events = sky.events(date.parse().unwrap()).unwrap();
        let transit = events.transit.unwrap();
        let tip = shadow_tip(&with_shadows(&site, &sky.direction(&transit)));
        let bearing = tip.at.x.atan2(tip.at.y).to_degrees();
        assert!((bearing - 25.0).abs() < 0.3, "{date}: {bearing}");
    }
}

#[test]
fn a_scene_with_a_sun_block_draws_the_sun_its_path_and_the_shadows() {
    let site = pole_scene(
        0.0,
        r#"sun: (date: "2026-06-21", time: "15:00", seasons: true),"#,
    );
    let settings = RenderSettings {
        width: 1024,
        height: 512,
        ..RenderSettings::default()
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    let names: Vec<&str> = render
        .drawing
        .layers
        .iter()
        .map(|l| l.name.as_str())
        .collect();
    for wanted in [
        "sun",
        "sun path",
        "sun hours",
        "sun paths of the solstices and equinox",
        "wireframe: shadows",
    ] {
        assert!(names.contains(&wanted), "{wanted} not in {names:?}");
    }
    assert!(render.notes.is_empty(), "{:?}", render.notes);
    // At night: no shadows, and it is said.
    let settings = RenderSettings {
        sun: SunChoice {
            moment: Some(LocalMoment::parse("2026-06-21", "23:30").unwrap()),
            ..SunChoice::default()
        },
        ..settings
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    assert!(
        render.notes[0].contains("below the horizon"),
        "{:?}",
        render.notes
    );
    assert!(!render
        .drawing
        .layers
        .iter()
        .any(|l| l.name == "wireframe: shadows" || l.name == "sun"));
}

#[test]
fn a_skipped_local_time_is_refused_as_bad_input() {
    // Europe/Zurich goes forward at 01:00 UT on 2026-03-29 (Directive 2000/84/EC), from
    // 02:00 to 03:00 local. In the scene: refused on loading, where the time is written.
    let text = pole_text(0.0, r#"sun: (date: "2026-03-29", time: "02:30"),"#);
    let error = parse_scene(text.as_bytes(), Path::new("pole.ron"), "pole").unwrap_err();
    assert!(error.is_bad_input());
    let message = error.to_string();
    assert!(
        message.starts_with("pole.ron:4:45: `sun.time`: "),
        "{message}"
    );
    assert!(message.contains("before 02:00 or from 03:00"), "{message}");
    // Asked for on the command line: refused when drawing.
    let site = pole_scene(0.0, "");
    let settings = RenderSettings {
        sun: SunChoice {
            moment: Some(LocalMoment::parse("2026-03-29", "02:30").unwrap()),
            ..SunChoice::default()
        },
        ..RenderSettings::default()
    };
    let error = draw(&site, &site.standpoints[0], &settings).unwrap_err();
    assert!(error.is_bad_input());
    assert!(
        error.to_string().contains("before 02:00 or from 03:00"),
        "{error}"
    );
}

#[test]
fn a_contact_sheet_over_times_of_day_shows_the_light_change() {
    use pansite::compose::{contact_sheet, sweep_times, ContactSettings};
    let site = pole_scene(0.0, "");
    let day = LocalMoment::parse("2026-06-21", "06:00").unwrap();
    let to = pansite::scene::parse_time("22:00").unwrap().0;
    let (standpoints, moments) = sweep_times(&site.standpoints[0], &day, to, 240.0).unwrap();
    assert_eq!(standpoints.len(), 5);
    assert!(
        standpoints[2].name.ends_with("2026-06-21 14:00"),
        "{}",
        standpoints[2].name
    );
    let settings = ContactSettings {
        moments,
        ..ContactSettings::default()
    };
    let sheet = contact_sheet(&site, &standpoints, &settings, &|_, _| {}).unwrap();
    let shadows = sheet
        .drawing
        .layers
        .iter()
        .find(|l| l.name == "wireframe: shadows")
        .expect("shadows on the sheet");
    assert!(!shadows.lines.is_empty());
}

/// The hours along the sun's path are labels like any other, placed by the one placer: a
/// layer each, apart from every other label, each beside a tick of its own, and in the
/// order of the day from east to west (at 47 degrees north in June the sun's azimuth grows
/// through the day: common practice, the sun-path diagram of any latitude beyond the tropic).
#[test]
fn the_suns_hours_are_placed_labels_in_the_order_of_the_day() {
    let mut site = pole_scene(0.0, r#"sun: (date: "2026-06-21", time: "15:00"),"#);
    // Facing south, the seam is north, where the June sun never is by day: x grows with
    // azimuth across the whole path.
    site.standpoints[0].heading = std::f64::consts::PI;
    let settings = RenderSettings {
        width: 2048,
        height: 1024,
        sun: SunChoice {
            path: Some(true),
            ..SunChoice::default()
        },
        ..RenderSettings::default()
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    let box_of = |l: &pansite::drawing::Layer| {
        let p = l.lines.points();
        let (mut b0, mut b1, mut b2, mut b3) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
        for q in p {
            (b0, b1, b2, b3) = (b0.min(q.x), b1.min(q.y), b2.max(q.x), b3.max(q.y));
        }
        [b0, b1, b2, b3]
    };
    let ticks: Vec<[f64; 4]> = render
        .drawing
        .layers
        .iter()
        .filter(|l| l.name == "sun hours")
        .flat_map(|l| {
            l.lines
                .iter()
                .map(|t| [t[0].x, t[0].y, t[1].x, t[1].y])
                .collect::<Vec<_>>()
        })
        .collect();
    let labels: Vec<(String, [f64; 4])> = render
        .drawing
        .layers
        .iter()
        .filter_map(|l| Some((l.text.as_ref()?.words.clone(), box_of(l), l.name.clone())))
        .map(|(t, b, name)| {
            (
                if name == "sun hour labels" {
                    t
                } else {
                    format!("other {t}")
                },
                b,
            )
        })
        .collect();
    let hours: Vec<(u32, [f64; 4])> = labels
        .iter()
        .filter_map(|(t, b)| Some((t.parse::<u32>().ok()?, *b)))
        .collect();
    assert!(hours.len() >= 10, "{} hour labels", hours.len());
    assert_eq!(render.labels_left_out + hours.len(), ticks.len());
    for (hour, b) in &hours {
        let (cx, cy) = ((b[0] + b[2]) / 2.0, (b[1] + b[3]) / 2.0);
        let h = b[3] - b[1];
        assert!(
            ticks
                .iter()
                .any(|t| (t[0] - cx).abs() < 3.0 * h && (cy - (t[1] + t[3]) / 2.0).abs() < 3.0 * h),
            "{hour:02} at {b:?} is beside no tick"
        );
    }
    let mut by_x = hours.clone();
    by_x.sort_by(|a, b| a.1[0].total_cmp(&b.1[0]));
    assert!(
        by_x.windows(2).all(|w| w[0].0 < w[1].0),
        "{:?}",
        by_x.iter().map(|h| h.0).collect::<Vec<_>>()
    );
    for (i, (ta, a)) in labels.iter().enumerate() {
        for (tb, b) in &labels[i + 1..] {
            let apart = a[2] <= b[0] || b[2] <= a[0] || a[3] <= b[1] || b[3] <= a[1];
            assert!(apart, "{ta} {a:?} overlaps {tb} {b:?}");
        }
    }
}

#[test]
fn on_sloping_ground_a_poles_shadow_falls_on_the_slope() {
    // A plane rising northwards at 1 in 4 (z = y / 4) and a thin pole 6 m tall standing
    // on it at the origin, the sun due south at 30 degrees. Plain trigonometry (the law of
    // sines in the triangle of the pole, its shadow up the slope and the ray past its top,
    // the angle at the shadow's tip being elevation + slope): the shadow runs up the slope
    // h cos(e) / sin(e + a) long, where a = atan(1/4) is the slope's angle.
    let text = "Scene(
        ground: (spots: [(-30, -30, -7.5), (30, -30, -7.5), (-30, 60, 15), (30, 60, 15)]),
        standpoints: [(name: \"below\", x: 8, y: -10)],
        items: [Block(label: \"pole\", at: Centre(0, 0), width: 0.02, depth: 0.02, height: 6,
                      on_ground: true)],
    )";
    let site = parse_scene(text.as_bytes(), Path::new("slope.ron"), "slope").unwrap();
    let top = site
        .faces
        .iter()
        .flat_map(|f| f.corners)
        .filter(|c| c.x.abs() < 0.05 && c.y.abs() < 0.05)
        .map(|c| c.z)
        .fold(f64::NEG_INFINITY, f64::max);
    assert!((top - 6.0).abs() < 0.01, "the pole's top is at {top}");
    let (elevation, slope) = (30f64.to_radians(), 0.25f64.atan());
    // Due south, the shadow runs up the slope; due north, down it, and the angle at the
    // tip is elevation - slope.
    for (north, angle_at_tip) in [(-1.0, elevation + slope), (1.0, elevation - slope)] {
        let towards_sun = nalgebra::Vector3::new(0.0, north * elevation.cos(), elevation.sin());
        let lines = shadow_outlines(&site, &towards_sun);
        assert!(!lines.is_empty());
        // Every line lies on the slope, none on the plane z = 0 beyond the pole's foot.
        for line in &lines {
            for p in [line.start, line.end] {
                assert!((p.z - p.y / 4.0).abs() < 1e-6, "{line:?} is off the slope");
            }
        }
        let tip = lines
            .iter()
            .flat_map(|l| [l.start, l.end])
            .max_by(|a, b| a.coords.norm().total_cmp(&b.coords.norm()))
            .unwrap();
        let expected = 6.0 * elevation.cos() / angle_at_tip.sin();
        // The pole is 2 cm thick: its far corner lies within 2 cm of the line's tip.
        assert!(
            (tip.coords.norm() - expected).abs() < 0.03 && tip.x.abs() < 0.02,
            "{tip} vs {expected} m up the slope"
        );
        // The tone's polygons lie on the slope too.
        let eye = site.standpoints[0].eye();
        let shade = seen_shade(&site, &towards_sun, &eye);
        let on_slope = shade
            .iter()
            .filter(|p| p.iter().all(|c| (c.z - c.y / 4.0).abs() < 1e-6))
            .count();
        assert!(on_slope > 0);
        assert!(shade
            .iter()
            .all(|p| !p.iter().all(|c| c.z.abs() < 1e-9 && c.y.abs() > 0.1)));
    }
}

#[test]
fn the_suns_mark_and_its_local_hour_land_where_its_azimuth_and_elevation_put_them() {
    // The equirectangular convention of the crate docs, written out here: x = (r + 180) /
    // 360 W, with r the sun's azimuth less the standpoint's heading (30 degrees), and
    // y = (90 - e) / 180 H, in pixel-edge coordinates.
    let site = pole_scene(
        0.0,
        r#"sun: (date: "2026-06-21", time: "15:00", seasons: true),"#,
    );
    let (width, height) = (1024u32, 512u32);
    let settings = RenderSettings {
        width,
        height,
        ..RenderSettings::default()
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    let sky = Sky::of_site(&site).unwrap();
    let pixel_of = |time: &str| {
        let sun = sky
            .at(&LocalMoment::parse("2026-06-21", time).unwrap())
            .unwrap();
        let r = (sun.place.azimuth_deg - 30.0 + 540.0).rem_euclid(360.0) - 180.0;
        (
            (r + 180.0) / 360.0 * width as f64,
            (90.0 - sun.place.elevation_deg) / 180.0 * height as f64,
        )
    };
    // The mark is drawn round the sun's place: the middle of its box.
    let mark = render
        .drawing
        .layers
        .iter()
        .find(|l| l.name == "sun")
        .expect("a sun layer");
    let points = mark.lines.points();
    let (lo_x, hi_x) = points.iter().fold((f64::MAX, f64::MIN), |(lo, hi), p| {
        (lo.min(p.x), hi.max(p.x))
    });
    let (lo_y, hi_y) = points.iter().fold((f64::MAX, f64::MIN), |(lo, hi), p| {
        (lo.min(p.y), hi.max(p.y))
    });
    let (x, y) = pixel_of("15:00");
    assert!(
        (0.5 * (lo_x + hi_x) - x).abs() < 0.5,
        "{lo_x}..{hi_x} against {x}"
    );
    assert!(
        (0.5 * (lo_y + hi_y) - y).abs() < 0.5,
        "{lo_y}..{hi_y} against {y}"
    );
    // The hour labels say local time (Zurich in summer: UT + 2): the label "15" stands at
    // the sun's place at 15:00 local, over its tick (above or below it, or beside it by
    // about a cap height); at 13:00 local the sun stood tens of pixels away.
    let label_x = |words: &str| {
        render
            .drawing
            .layers
            .iter()
            .filter_map(|l| l.text.as_ref())
            .find(|t| t.words == words)
            .map(|t| t.at.x)
            .unwrap_or_else(|| panic!("no label {words:?}"))
    };
    let text = 0.04 * height as f64;
    assert!(
        (label_x("15") - x).abs() < 2.0 * text,
        "{} against {x}",
        label_x("15")
    );
    let (x13, _) = pixel_of("13:00");
    assert!((x13 - x).abs() > 4.0 * text, "{x13} against {x}");
    assert!(
        (label_x("13") - x13).abs() < 2.0 * text,
        "{} against {x13}",
        label_x("13")
    );
}

/// The sun's apparent place by an algorithm of its own, for the paths: the Plataforma
/// Solar de Almeria's (Blanco-Muriel et al., "Computing the solar vector", Solar Energy
/// 70(5), 2001, about half a minute of arc), through the `spa` crate, with the
/// refraction of Saemundsson's formula (Meeus, "Astronomical Algorithms", 2nd ed., eq.
/// 16.4, from memory) in the standard atmosphere at sea level (1013.25 hPa, 15 C, ICAO Doc
/// 7488). Returns (azimuth, elevation) in degrees.
fn psa_sun(unix_s: i64, latitude: f64, longitude: f64) -> (f64, f64) {
    use chrono::TimeZone;
    let utc = chrono::Utc.timestamp_opt(unix_s, 0).unwrap();
    let sun = spa::solar_position::<spa::StdFloatOps>(utc, latitude, longitude).unwrap();
    let e = 90.0 - sun.zenith_angle;
    let air = (1013.25 / 1010.0) * (283.0 / (273.0 + 15.0));
    let refraction_arcmin = air * 1.02 / (e + 10.3 / (e + 5.11)).to_radians().tan();
    (sun.azimuth, e + refraction_arcmin / 60.0)
}

/// The pixel of an azimuth and elevation by the crate docs' convention, written out:
/// x = (r + 180) / 360 W with r the azimuth less the heading, y = (90 - e) / 180 H.
fn pixel(azimuth: f64, elevation: f64, heading: f64, width: f64, height: f64) -> (f64, f64) {
    let r = (azimuth - heading + 540.0).rem_euclid(360.0) - 180.0;
    (
        (r + 180.0) / 360.0 * width,
        (90.0 - elevation) / 180.0 * height,
    )
}

/// The site drawn from its first standpoint turned to `heading` degrees, on an image of
/// `size` pixels.
fn drawn_facing(site: &mut Site, heading: f64, size: (f64, f64)) -> pansite::render::Render {
    site.standpoints[0].heading = heading.to_radians();
    let settings = RenderSettings {
        width: size.0 as u32,
        height: size.1 as u32,
        ..RenderSettings::default()
    };
    draw(site, &site.standpoints[0], &settings).unwrap()
}

/// The lines of the drawing's layer `name`.
fn layer_lines<'a>(render: &'a pansite::render::Render, name: &str) -> Vec<&'a [ImagePoint]> {
    render
        .drawing
        .layers
        .iter()
        .filter(|l| l.name == name)
        .flat_map(|l| l.lines.iter())
        .collect()
}

#[test]
fn the_days_path_lies_where_another_solar_algorithm_puts_the_sun() {
    // The June solstice at the pole's square (47.3 N, 8.1 E; Zurich keeps UT + 2 in summer,
    // Directive 2000/84/EC), seen with the heading 200 so that the seam (azimuth 20) lies
    // where the June sun never is by day there.
    let mut site = pole_scene(0.0, r#"sun: (date: "2026-06-21", time: "15:00"),"#);
    let heading = 200.0;
    let (width, height) = (2048.0, 1024.0);
    let render = drawn_facing(&mut site, heading, (width, height));
    let drawn = layer_lines(&render, "sun path");
    // The independent path, a minute apart over the local day (2026-06-20 22:00 UT to
    // 2026-06-21 22:00 UT), cut where it dips under 5 degrees: refraction lower down is
    // too uncertain for a half pixel.
    const LOWEST: f64 = 5.0;
    let midnight = 1_781_992_800; // 2026-06-20 22:00:00 UT
    let mut reference: Vec<Vec<ImagePoint>> = vec![Vec::new()];
    for minute in 0..=24 * 60 {
        let (azimuth, elevation) = psa_sun(midnight + 60 * minute, 47.3, 8.1);
        if elevation < LOWEST {
            if !reference.last().unwrap().is_empty() {
                reference.push(Vec::new());
            }
            continue;
        }
        let (x, y) = pixel(azimuth, elevation, heading, width, height);
        reference.last_mut().unwrap().push(ImagePoint::new(x, y));
    }
    let reference: Vec<&[ImagePoint]> = reference
        .iter()
        .filter(|l| l.len() > 1)
        .map(|l| l.as_slice())
        .collect();
    assert_eq!(reference.len(), 1, "one arc above 5 degrees by day");
    // Every minute of the other algorithm's path is within half a pixel of the drawn path,
    // and every drawn point above 5 degrees within half a pixel of the other's.
    for p in reference[0] {
        let d = common::distance_to_polylines(*p, drawn.iter().copied());
        assert!(d < 0.5, "the sun at {p:?} is {d} px off the drawn path");
    }
    let lowest_y = (90.0 - LOWEST) / 180.0 * height;
    let above: Vec<ImagePoint> = drawn
        .iter()
        .flat_map(|l| l.iter().copied())
        .filter(|p| p.y < lowest_y - 0.5)
        .collect();
    assert!(above.len() > 100, "{} drawn points", above.len());
    for p in above {
        let d = common::distance_to_polylines(p, reference.iter().copied());
        assert!(
            d < 0.5,
            "the drawn {p:?} is {d} px off the other algorithm's path"
        );
    }
}

#[test]
fn the_season_paths_culminate_where_the_declinations_put_them() {
    // Common practice (the sun-path diagram): at latitude phi the sun crosses the meridian
    // at 90 - phi + delta, the declination delta being +23.44 at the June solstice, -23.44
    // at the December one (the obliquity of the ecliptic, Astronomical Almanac) and about
    // 0 at the equinoxes. It changes by about 0.4 degrees a day near an equinox and hardly
    // at all near a solstice, so a path drawn for the day has its noon within 0.2 (0.01) of
    // those. Refraction (Saemundsson, as above) lifts each by 0.05 at most.
    let mut site = pole_scene(
        0.0,
        r#"sun: (date: "2026-06-21", time: "15:00", seasons: true),"#,
    );
    let heading = 200.0;
    let (width, height) = (2048.0, 1024.0);
    let render = drawn_facing(&mut site, heading, (width, height));
    let seasons = layer_lines(&render, "sun paths of the solstices and equinox");
    // Where the paths cross the meridian (azimuth 180): the column of that azimuth.
    let (meridian_x, _) = pixel(180.0, 0.0, heading, width, height);
    let mut noons: Vec<f64> = seasons
        .iter()
        .flat_map(|l| l.windows(2))
        .filter(|w| (w[0].x - meridian_x) * (w[1].x - meridian_x) <= 0.0 && w[0].x != w[1].x)
        .map(|w| {
            let s = (meridian_x - w[0].x) / (w[1].x - w[0].x);
            let y = w[0].y + s * (w[1].y - w[0].y);
            90.0 - 180.0 * y / height
        })
        .collect();
    noons.sort_by(f64::total_cmp);
    noons.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    // Four paths: the December solstice, both equinoxes, the June solstice.
    assert_eq!(noons.len(), 4, "{noons:?}");
    let refraction = |e: f64| 1.02 / (e + 10.3 / (e + 5.11)).to_radians().tan() / 60.0;
    let half_pixel = 0.5 * 180.0 / height;
    let phi = 47.3;
    for (noon, delta, slack) in [
        (noons[0], -23.44, 0.01),
        (noons[1], 0.0, 0.2),
        (noons[2], 0.0, 0.2),
        (noons[3], 23.44, 0.01),
    ] {
        let geometric = 90.0 - phi + delta;
        let expected = geometric + refraction(geometric);
        assert!(
            (noon - expected).abs() < half_pixel + slack,
            "a path culminates at {noon}, expected {expected} (declination {delta})"
        );
    }
}

/// Whether the site point `p` is in the sun: the ray from it towards the sun `s` (unit)
/// crosses no face, by the tests' own ray caster (Moeller-Trumbore, `common::crossing`).
fn lit(site: &Site, p: &Point3<f64>, s: &Vector3<f64>) -> bool {
    !site
        .faces
        .iter()
        .any(|f| common::crossing(p, s, &f).is_some())
}

/// Whether the site point `p` is seen from `eye`: no face crosses the sight line nearer than
/// the point less the renderer's documented depth bias (as in tests/hidden_lines.rs).
fn seen_from(site: &Site, eye: &Point3<f64>, p: &Point3<f64>) -> bool {
    let to = p - eye;
    let distance = to.norm();
    let limit = distance * (1.0 - DEPTH_BIAS);
    !site
        .faces
        .iter()
        .any(|f| common::crossing(eye, &(to / distance), &f).is_some_and(|t| t < limit))
}

/// The pixel of a site point seen from `eye` with the view turned to `heading` (degrees).
fn pixel_of_point(p: &Point3<f64>, eye: &Point3<f64>, heading: f64, w: f64, h: f64) -> ImagePoint {
    let d = p - eye;
    let azimuth = d.x.atan2(d.y).to_degrees();
    let elevation = d.z.atan2(d.x.hypot(d.y)).to_degrees();
    let (x, y) = pixel(azimuth, elevation, heading, w, h);
    ImagePoint::new(x, y)
}

/// The convex hull of points in the plane, anticlockwise (Andrew's monotone chain).
fn hull(mut points: Vec<Vector2<f64>>) -> Vec<Vector2<f64>> {
    points.sort_by(|a, b| a.x.total_cmp(&b.x).then(a.y.total_cmp(&b.y)));
    let cross = |o: Vector2<f64>, a: Vector2<f64>, b: Vector2<f64>| (a - o).perp(&(b - o));
    let mut chain: Vec<Vector2<f64>> = Vec::new();
    for pass in [points.clone(), points.into_iter().rev().collect()] {
        let start = chain.len();
        for p in pass {
            while chain.len() >= start + 2
                && cross(chain[chain.len() - 2], chain[chain.len() - 1], p) <= 0.0
            {
                chain.pop();
            }
            chain.push(p);
        }
        chain.pop();
    }
    chain
}

#[test]
fn a_shadow_behind_a_nearer_wall_is_hidden_like_any_edge() {
    // An invented yard at the pole's square at noon in midwinter: the sun low in the south
    // (about 19 degrees), so a tower 12 m tall casts a shadow some 34 m long northwards. The
    // eye stands north of it all, looking south, and a wall taller than the eye stands
    // between, covering the western half of the shadow (x < 0). Hidden edges are drawn
    // undashed so that each hidden stretch is a whole line.
    let text = r#"Scene(
        name: "winter yard",
        location: (latitude: 47.3, longitude: 8.1, time_zone: "Europe/Zurich"),
        sun: (date: "2026-12-21", time: "12:30"),
        styles: {"hidden": (dash_mm: (0, 0))},
        standpoints: [(name: "north gate", x: 0, y: 50, heading: 180)],
        items: [
            Block(label: "tower", at: Centre(0, 0), width: 6, depth: 6, height: 12),
            Block(label: "wall", at: Centre(-4, 42), width: 8, depth: 0.3, height: 2.5),
        ],
    )"#;
    let site = parse_scene(text.as_bytes(), Path::new("yard.ron"), "yard").unwrap();
    let sky = Sky::of_site(&site).unwrap();
    let sun = sky
        .at(&LocalMoment::parse("2026-12-21", "12:30").unwrap())
        .unwrap();
    let s = sky.direction(&sun);
    let (w, h) = (2048.0, 1024.0);
    let settings = RenderSettings {
        width: w as u32,
        height: h as u32,
        ..RenderSettings::default()
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    let shadows = layer_lines(&render, "wireframe: shadows");
    let hidden = layer_lines(&render, "hidden");
    // The tower's shadow on the ground, worked here: the hull of its foot and of its top
    // carried along the rays to the ground (p - s p.z / s.z).
    let mut corners = Vec::new();
    for (x, y) in [(-3.0, -3.0), (3.0, -3.0), (3.0, 3.0), (-3.0, 3.0)] {
        corners.push(Vector2::new(x, y));
        corners.push(Vector2::new(x - s.x * 12.0 / s.z, y - s.y * 12.0 / s.z));
    }
    let outline = hull(corners);
    let eye = site.standpoints[0].eye();
    let heading = 180.0;
    let (mut seen_count, mut hidden_count) = (0, 0);
    for (k, a) in outline.iter().enumerate() {
        let b = outline[(k + 1) % outline.len()];
        let along = (b - a).normalize();
        // Outwards, the hull being anticlockwise.
        let out = Vector2::new(along.y, -along.x);
        let length = (b - a).norm();
        let count = (length / 0.25) as usize;
        for i in 1..count {
            let p = a + along * (length * i as f64 / count as f64);
            // Off the tower's foot, where the outline runs along its walls.
            if p.x.abs().max(p.y.abs()) < 3.3 {
                continue;
            }
            let at = |q: Vector2<f64>| Point3::new(q.x, q.y, 0.0);
            // The outline is the shadow's: just inside shaded, just outside lit.
            assert!(!lit(&site, &at(p - 0.01 * out), &s), "{p:?} inside is lit");
            assert!(
                lit(&site, &at(p + 0.01 * out), &s),
                "{p:?} outside is shaded"
            );
            // Seen or hidden by the ray cast, away from where that changes.
            let seen = seen_from(&site, &eye, &at(p));
            if [-0.3, 0.3]
                .iter()
                .any(|d| seen_from(&site, &eye, &at(p + along * *d)) != seen)
            {
                continue;
            }
            let pixel = pixel_of_point(&at(p), &eye, heading, w, h);
            let to_seen = common::distance_to_polylines(pixel, shadows.iter().copied());
            let to_hidden = common::distance_to_polylines(pixel, hidden.iter().copied());
            if seen {
                seen_count += 1;
                assert!(to_seen < 0.5, "seen {p:?} is {to_seen} px off the shadows");
            } else {
                hidden_count += 1;
                assert!(
                    to_hidden < 0.5,
                    "hidden {p:?} is {to_hidden} px off the hidden lines"
                );
                assert!(
                    to_seen > 2.0,
                    "hidden {p:?} is drawn as seen ({to_seen} px)"
                );
            }
        }
    }
    assert!(
        seen_count > 50 && hidden_count > 50,
        "{seen_count} seen, {hidden_count} hidden"
    );
}

#[test]
fn shadows_on_and_of_a_round_tower_lie_within_its_facets_tolerance() {
    // A round tower 4 m across and 12 m tall, and south of it a slab 2 m wide and 8 m tall
    // whose shadow climbs the tower's south face (and none of it passes the tower); the
    // sun a little east of south, 25 degrees up. The tower is cut into flat facets 3.75
    // degrees wide (the scene's `FACET_ANGLE`, a 96th of a turn) whose corners lie on the
    // true circle, so they stand off it by at most r (1 - cos 1.875 degrees): the shadows
    // fall on the facets, so they lie within that of the true shapes.
    let text = r#"Scene(
        standpoints: [(name: "east", x: 20, y: 0, heading: 270)],
        items: [
            Tower(label: "tower", at: (0, 0), diameter: 4, height: 12, roof: Flat),
            Block(label: "slab", at: Centre(1, -6), width: 2, depth: 1, height: 8),
        ],
    )"#;
    let site = parse_scene(text.as_bytes(), Path::new("tower.ron"), "tower").unwrap();
    let (azimuth, elevation) = (170f64.to_radians(), 25f64.to_radians());
    let s = Vector3::new(
        azimuth.sin() * elevation.cos(),
        azimuth.cos() * elevation.cos(),
        elevation.sin(),
    );
    let r = 2.0;
    let gap = r * (1.0 - 1.875f64.to_radians().cos());
    let lines = shadow_outlines(&site, &s);
    let radius = |p: &Point3<f64>| p.x.hypot(p.y);
    let on_tower: Vec<_> = lines
        .iter()
        .filter(|l| [l.start, l.end].iter().all(|p| p.z > 1e-6))
        .collect();
    let on_ground: Vec<_> = lines
        .iter()
        .filter(|l| [l.start, l.end].iter().all(|p| p.z.abs() < 1e-9))
        .collect();
    // On the tower: every line on its facets, and the ray cast finds shade on one side of
    // it and sun on the other (1 cm across the line along the face, 1 mm off it).
    assert!(on_tower.len() >= 8, "{} lines on the tower", on_tower.len());
    for line in &on_tower {
        let along = line.end - line.start;
        if along.norm() < 0.02 {
            continue;
        }
        for k in 1..10 {
            let p = line.start + along * (k as f64 / 10.0);
            let rho = radius(&p);
            assert!(
                rho > r - gap - 1e-9 && rho < r + 1e-9,
                "{p} is {rho} m from the axis"
            );
            let out = Vector3::new(p.x, p.y, 0.0) / rho;
            let across = along.cross(&out).normalize();
            let [a, b] = [1.0, -1.0].map(|side| p + 0.01 * side * across + 0.001 * out);
            assert_ne!(
                lit(&site, &a, &s),
                lit(&site, &b, &s),
                "{p}: no edge of shade"
            );
        }
    }
    // The slab's top edge (y = -5.5, z = 8) on the true cylinder, by plain trigonometry:
    // the point of the tower at angle t from the south whose ray to the sun reaches the
    // slab's north face at height 8. Where that ray meets the slab's face (x within it), a
    // line on the tower passes that height within the facets' gap times the ray's slope,
    // over the cosine of the angle between the face's normal and the sun.
    let true_height = |t: f64| {
        let (x, y) = (r * t.sin(), -r * t.cos());
        let k = (-5.5 - y) / s.y;
        (8.0 - k * s.z, x + k * s.x)
    };
    let mut crossed = 0;
    for step in -30..=30 {
        let t = f64::to_radians(step as f64);
        let (z, x_at_slab) = true_height(t);
        if (x_at_slab - 1.0).abs() > 0.9 {
            continue;
        }
        // The lines on the tower crossing the upright half-plane at angle t.
        let u = Vector2::new(t.sin(), -t.cos());
        let heights: Vec<f64> = on_tower
            .iter()
            .filter_map(|l| {
                let side = |p: &Point3<f64>| u.perp(&Vector2::new(p.x, p.y));
                let (a, b) = (side(&l.start), side(&l.end));
                if a * b > 0.0 || a == b || l.start.coords.xy().dot(&u) < 0.0 {
                    return None;
                }
                Some(l.start.z + (l.end.z - l.start.z) * a / (a - b))
            })
            .collect();
        let nearest = heights
            .iter()
            .map(|h| (h - z).abs())
            .fold(f64::INFINITY, f64::min);
        let slope = s.z / s.xy().norm();
        assert!(
            nearest <= gap * slope / (0.3f64).max(u.dot(&s.xy().normalize())) + 1e-6,
            "at {step} degrees the slab's shadow is {nearest} m off its height {z}: {heights:?}"
        );
        crossed += 1;
    }
    assert!(crossed > 40, "{crossed} angles checked");
    // The tower's own shadow on the ground, north of it: the ground within r of the line
    // from its foot's centre to its top's centre carried along the rays, so its outline
    // lies between r and r less the facets' gap from that line, and the ray cast finds
    // shade just inside and sun just outside.
    let top = Vector2::new(-s.x, -s.y) * 12.0 / s.z;
    let from_axis = |p: Vector2<f64>| {
        let k = (p.dot(&top) / top.norm_squared()).clamp(0.0, 1.0);
        (p - top * k, k)
    };
    let mut checked = 0;
    for line in &on_ground {
        for k in 1..10 {
            let p = line.start + (line.end - line.start) * (k as f64 / 10.0);
            if p.y < 0.5 {
                continue; // the slab's shadow, which meets the tower's foot
            }
            let (off, _) = from_axis(p.coords.xy());
            let d = off.norm();
            assert!(
                d > r - gap - 1e-9 && d < r + 1e-9,
                "{p} is {d} m from the axis"
            );
            let out = Vector3::new(off.x, off.y, 0.0) / d;
            assert!(!lit(&site, &(p - 0.01 * out), &s), "{p}: lit inside");
            assert!(lit(&site, &(p + 0.01 * out), &s), "{p}: shaded outside");
            checked += 1;
        }
    }
    assert!(checked > 100, "{checked} points of the tower's shadow");
    // And the whole true outline is drawn: every point of it north of the foot lies within
    // the gap of a line.
    let mut outline = 0;
    for step in 0..720 {
        let a = f64::to_radians(step as f64 / 2.0);
        let radial = Vector2::new(a.sin(), a.cos()) * r;
        for centre in [Vector2::zeros(), top] {
            let p = centre + radial;
            let (off, _) = from_axis(p);
            if p.y < 0.5 || off.norm() < r - 1e-9 {
                continue; // inside the shadow, not on its outline
            }
            let q = Point3::new(p.x, p.y, 0.0);
            let nearest = on_ground
                .iter()
                .map(|l| {
                    let e = l.end - l.start;
                    let k = ((q - l.start).dot(&e) / e.norm_squared()).clamp(0.0, 1.0);
                    (q - (l.start + e * k)).norm()
                })
                .fold(f64::INFINITY, f64::min);
            assert!(
                nearest <= gap + 1e-9,
                "{p:?} is {nearest} m from the drawn outline"
            );
            outline += 1;
        }
    }
    assert!(outline > 300, "{outline} points of the true outline");
}
