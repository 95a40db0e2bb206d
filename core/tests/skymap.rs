//! The sky map: cells against single-pointing reports, the skipped-below-20° rule, named errors
//! for bad grids and the CSV round trip.

use approx::assert_relative_eq;
use stillsky::Error;
use stillsky::batch::{GroundSource, ReportOptions, build_file_report, build_report, report_sky_map};
use stillsky::schema::{ModelFile, Pointing};
use stillsky::sky::{Equatorial, PierSide};
use stillsky::skymap::{SkyFrame, SkyGrid, SkyMap};
use stillsky::spectrum::ReferenceGround;
use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};

fn example(name: &str) -> ModelFile {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/examples").join(name);
    ModelFile::read(&p).unwrap()
}

fn options() -> ReportOptions {
    let mut o = ReportOptions::new().unwrap();
    o.grid = stillsky::FreqGrid::log(0.2, 100.0, 160).unwrap();
    o.ground = Some(GroundSource::Reference(ReferenceGround::Nhnm));
    o.wind = Some(WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2)));
    o
}

fn equatorial_grid() -> SkyGrid {
    SkyGrid {
        frame: SkyFrame::Equatorial,
        rows_deg: vec![-60.0, 15.0, 75.0],
        cols_deg: vec![-40.0, 10.0, 60.0],
        min_altitude_deg: 20.0,
    }
}

#[test]
fn each_cell_equals_the_report_of_that_pointing() {
    let f = example("equatorial-pier.toml");
    let mut o = options();
    o.sky_map = Some(Some(equatorial_grid()));
    let r = build_file_report(&f, &o).unwrap();
    let m = r.sky_map.as_ref().unwrap();
    let mut checked = 0;
    for (i, h) in m.rows_deg.iter().enumerate() {
        for (j, d) in m.cols_deg.iter().enumerate() {
            if !m.rms_arcsec[i][j].is_finite() {
                continue;
            }
            let mut g = f.clone();
            g.repoint(&Pointing {
                hour_angle_deg: Some(*h),
                declination_deg: Some(*d),
                pier_side: Some(PierSide::usual(*h)),
                ..Default::default()
            })
            .unwrap();
            let single = build_file_report(&g, &options()).unwrap();
            assert!(single.sky_map.is_none());
            assert_relative_eq!(m.rms_arcsec[i][j], single.image.rms_arcsec, max_relative = 1e-9);
            assert_relative_eq!(m.rms_px[i][j], single.image.rms_px, max_relative = 1e-9);
            checked += 1;
        }
    }
    assert!(checked >= 5, "{checked} cells computed");

    // Alt-azimuth: the tripod at altitude 30°, azimuth 120° against its own report.
    let t = example("tripod-paver.toml");
    let sky = SkyGrid {
        frame: SkyFrame::AltAz,
        rows_deg: vec![30.0, 70.0],
        cols_deg: vec![0.0, 120.0],
        min_altitude_deg: 20.0,
    };
    let m = report_sky_map(&t, Some(&sky), &options()).unwrap();
    let mut g = t.clone();
    g.repoint(&Pointing { altitude_deg: Some(30.0), azimuth_deg: Some(120.0), ..Default::default() })
        .unwrap();
    let single = build_file_report(&g, &options()).unwrap();
    assert_relative_eq!(m.rms_arcsec[0][1], single.image.rms_arcsec, max_relative = 1e-9);
    assert_relative_eq!(m.rms_px[0][1], single.image.rms_px, max_relative = 1e-9);
}

#[test]
fn low_cells_are_skipped_and_never_named() {
    let f = example("equatorial-pier.toml");
    let m = report_sky_map(&f, Some(&equatorial_grid()), &options()).unwrap();
    let lat = m.latitude_deg.unwrap();
    assert_eq!(lat, 48.0);
    let mut skipped = 0;
    for (i, h) in m.rows_deg.iter().enumerate() {
        for (j, d) in m.cols_deg.iter().enumerate() {
            // Meeus, Astronomical Algorithms, ch. 13: sin h = sin φ sin δ + cos φ cos δ cos H.
            let (p, dd, hh) = (lat.to_radians(), d.to_radians(), h.to_radians());
            let alt = (p.sin() * dd.sin() + p.cos() * dd.cos() * hh.cos()).asin().to_degrees();
            assert!((m.altitude_deg[i][j] - alt).abs() < 1e-9);
            assert_eq!(m.rms_arcsec[i][j].is_nan(), alt < 20.0, "H {h} δ {d} h {alt}");
            skipped += usize::from(alt < 20.0);
        }
    }
    assert!(skipped >= 2, "the grid should reach below 20°: {skipped}");
    let (b, w) = (m.best.unwrap(), m.worst.unwrap());
    let vals: Vec<f64> = m.rms_arcsec.iter().flatten().copied().filter(|v| v.is_finite()).collect();
    assert_eq!(b.rms_arcsec, vals.iter().copied().fold(f64::INFINITY, f64::min));
    assert_eq!(w.rms_arcsec, vals.iter().copied().fold(0.0, f64::max));
    for c in [b, w] {
        assert!(c.altitude_deg >= 20.0);
        let (alt, _) = Equatorial::new(lat, c.row_deg, c.col_deg).unwrap().alt_az();
        assert!((alt - c.altitude_deg).abs() < 1e-12);
    }
    assert!(w.rms_arcsec > b.rms_arcsec);
    let text = m.summary_text();
    assert!(text.starts_with("best: hour angle ") && text.contains("; worst: hour angle "), "{text}");

    // Every cell below the limit: nothing named.
    let low = SkyGrid { rows_deg: vec![180.0], cols_deg: vec![-30.0], ..equatorial_grid() };
    let m = report_sky_map(&f, Some(&low), &options()).unwrap();
    assert!(m.best.is_none() && m.worst.is_none() && m.rms_arcsec[0][0].is_nan());
    assert!(m.summary_text().contains("no cell"), "{}", m.summary_text());
}

#[test]
fn default_grids_follow_the_rig() {
    let g = SkyGrid::default_for(&example("equatorial-pier.toml")).unwrap();
    assert_eq!(g.frame, SkyFrame::Equatorial);
    assert_eq!(g.rows_deg.len(), 13);
    assert_eq!((g.rows_deg[0], g.rows_deg[12]), (-90.0, 90.0));
    // Latitude 48°: declinations whose meridian altitude is at least 20°, by 10°: −20° … 90°.
    assert_eq!(g.cols_deg, (0..12).map(|k| -20.0 + 10.0 * k as f64).collect::<Vec<_>>());
    let g = SkyGrid::default_for(&example("tripod-paver.toml")).unwrap();
    assert_eq!(g.frame, SkyFrame::AltAz);
    assert_eq!((g.rows_deg.len(), g.cols_deg.len()), (8, 12));
}

#[test]
fn bad_grids_and_options_give_named_errors() {
    let eq = example("equatorial-pier.toml");
    let alt = example("tripod-paver.toml");
    let name_of = |e: Error| match e {
        Error::InvalidArgument { name, .. } => name,
        other => panic!("{other:?}"),
    };
    let o = options();
    let empty = SkyGrid { rows_deg: vec![], ..equatorial_grid() };
    assert_eq!(name_of(report_sky_map(&eq, Some(&empty), &o).unwrap_err()), "sky grid hour_angle_deg");
    let far = SkyGrid { cols_deg: vec![95.0], ..equatorial_grid() };
    assert_eq!(name_of(report_sky_map(&eq, Some(&far), &o).unwrap_err()), "sky grid declination_deg");
    let nan = SkyGrid { rows_deg: vec![f64::NAN], ..equatorial_grid() };
    assert_eq!(name_of(report_sky_map(&eq, Some(&nan), &o).unwrap_err()), "sky grid hour_angle_deg");
    let min = SkyGrid { min_altitude_deg: 100.0, ..equatorial_grid() };
    assert_eq!(name_of(report_sky_map(&eq, Some(&min), &o).unwrap_err()), "sky grid min_altitude_deg");
    // The frame must suit the rig.
    let altaz = SkyGrid { frame: SkyFrame::AltAz, ..equatorial_grid() };
    assert_eq!(name_of(report_sky_map(&eq, Some(&altaz), &o).unwrap_err()), "sky grid");
    assert_eq!(name_of(report_sky_map(&alt, Some(&equatorial_grid()), &o).unwrap_err()), "sky grid");
    // A sky map and a wind direction need the file; a direction needs wind derived from parts.
    let mut with_map = options();
    with_map.sky_map = Some(None);
    assert_eq!(name_of(build_report(&alt.expanded().unwrap(), &with_map).unwrap_err()), "sky_map");
    let mut with_wind = options();
    with_wind.wind_from_deg = Some(90.0);
    assert_eq!(name_of(build_report(&alt.expanded().unwrap(), &with_wind).unwrap_err()), "wind_from_deg");
    let mut fixed = alt.clone();
    fixed.generic.wind = Some(stillsky::assembly::WindLoadSpec {
        body: Some("payload".into()),
        centre_of_pressure_m: Some([0.0, 0.0, 1.4]),
        direction: Some([1.0, 0.0, 0.0]),
        area_m2: Some(0.2),
        drag_coefficient: Some(1.2),
        ..Default::default()
    });
    assert_eq!(name_of(fixed.set_wind_from(90.0).unwrap_err()), "wind direction");
    assert_eq!(name_of(alt.clone().set_wind_from(f64::INFINITY).unwrap_err()), "wind from_azimuth_deg");
}

#[test]
fn wind_from_the_west_is_the_files_own_direction() {
    // The example file derives its wind for a wind from the west.
    let f = example("equatorial-pier.toml");
    assert_eq!(f.rig.wind_load.as_ref().unwrap().from_azimuth_deg, Some(270.0));
    let sky = SkyGrid { rows_deg: vec![30.0], cols_deg: vec![40.0], ..equatorial_grid() };
    let own = report_sky_map(&f, Some(&sky), &options()).unwrap();
    let mut o = options();
    o.wind_from_deg = Some(270.0);
    let west = report_sky_map(&f, Some(&sky), &o).unwrap();
    assert_relative_eq!(own.rms_arcsec[0][0], west.rms_arcsec[0][0], max_relative = 1e-9);
    o.wind_from_deg = Some(0.0);
    let north = report_sky_map(&f, Some(&sky), &o).unwrap();
    assert!((north.rms_arcsec[0][0] / own.rms_arcsec[0][0] - 1.0).abs() > 1e-3);
}

/// Read the CSV of [`SkyMap::csv_text`] back: header and (row, col, rms_arcsec, rms_px) rows.
fn read_csv(text: &str) -> (Vec<String>, Vec<[f64; 4]>) {
    let mut lines = text.lines();
    let head = lines.next().unwrap().split(',').map(String::from).collect();
    let rows = lines
        .map(|l| {
            let v: Vec<f64> = l.split(',').map(|x| x.parse().unwrap()).collect();
            [v[0], v[1], v[2], v[3]]
        })
        .collect();
    (head, rows)
}

#[test]
fn csv_round_trip() {
    let f = example("equatorial-pier.toml");
    let m: SkyMap = report_sky_map(&f, Some(&equatorial_grid()), &options()).unwrap();
    let (head, rows) = read_csv(&m.csv_text());
    assert_eq!(head, ["hour_angle_deg", "declination_deg", "rms_arcsec", "rms_px"]);
    assert_eq!(rows.len(), 9);
    for (k, r) in rows.iter().enumerate() {
        let (i, j) = (k / 3, k % 3);
        assert_eq!((r[0], r[1]), (m.rows_deg[i], m.cols_deg[j]));
        for (got, want) in [(r[2], m.rms_arcsec[i][j]), (r[3], m.rms_px[i][j])] {
            assert!(got.to_bits() == want.to_bits() || (got.is_nan() && want.is_nan()), "{got} vs {want}");
        }
    }
}
