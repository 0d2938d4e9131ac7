//! Settings from arguments: every working object the commands need is built here, each in
//! exactly one function, so an option means the same thing in every command.

use crate::args::{
    AidArgs, AnglesArgs, DaylightArgs, ModelArgs, PlanArgs, PreviewArgs, RenderArgs, SheetArgs,
    SunArgs, TileArgs, UnitArg, UpArg,
};
use pansite::aids::AidSettings;
use pansite::compose::{ContactSettings, PlanScale, PlanSettings, PreviewSettings};
use pansite::page::{title_lines, today};
use pansite::page::{PageSettings, Paper, Tiling};
use pansite::plane::Equirect;
use pansite::render::{RenderSettings, SunChoice};
use pansite::scene::{
    load_style_sheet, parse_date, parse_time, HiddenEdges, LocalMoment, MeshPlacement, Site,
    Standpoint, Unit, UpAxis,
};
use pansite::sun::TableRequest;
use pansite::Error;
use std::time::Duration;

/// How an OBJ model given instead of a scene is placed.
pub fn mesh_placement(args: &ModelArgs) -> MeshPlacement {
    MeshPlacement {
        up: match args.up {
            UpArg::Y => UpAxis::Y,
            UpArg::Z => UpAxis::Z,
        },
        unit: match args.unit {
            UnitArg::M => Unit::Metre,
            UnitArg::Cm => Unit::Centimetre,
            UnitArg::Mm => Unit::Millimetre,
            UnitArg::In => Unit::Inch,
            UnitArg::Ft => Unit::Foot,
        },
        crease_deg: args.crease,
        ..MeshPlacement::default()
    }
}

/// The panorama `render` and `watch` draw.
pub fn render_settings(args: &RenderArgs) -> pansite::Result<RenderSettings> {
    let settings = RenderSettings {
        width: args.size.0,
        height: args.size.1,
        tolerance_px: args.tolerance,
        line_weight_px: args.line_weight,
        overlays: !args.bare,
        hidden: args.hidden.map(HiddenEdges::from),
        dpi: args.dpi,
        base_styles: None,
        styles: args.style.as_deref().map(load_style_sheet).transpose()?,
        weight_by_distance: args.weigh_by_distance,
        aids: aid_settings(&args.aids),
        time_limit: Some(Duration::from_secs_f64(args.time_limit)),
        sun: sun_choice(&args.sun)?,
    };
    settings.validate()?;
    Ok(settings)
}

/// The page layout `render` asks for, if any.
pub fn page_settings(
    args: &RenderArgs,
    site: &Site,
    standpoint: &Standpoint,
) -> pansite::Result<Option<PageSettings>> {
    let Some(name) = &args.page else {
        for (flag, given) in [
            ("--band", args.band.is_some()),
            ("--tiles", args.tiles.is_some()),
            ("--portrait", args.portrait),
        ] {
            if given {
                return Err(Error::Setting(format!("{flag} needs a page: give --page")));
            }
        }
        return Ok(None);
    };
    Ok(Some(PageSettings {
        paper: paper(name, args.portrait)?,
        margin_mm: args.margin,
        dpi: args.dpi,
        band_deg: args.band.unwrap_or((-90.0, 90.0)),
        title: (!args.no_title).then(|| title_lines(site, standpoint, today())),
        tiles: args.tiles.map(|(columns, rows)| Tiling {
            columns,
            rows,
            overlap_mm: args.overlap,
        }),
    }))
}

/// A paper by name, landscape unless `portrait`.
pub fn paper(name: &str, portrait: bool) -> pansite::Result<Paper> {
    let paper = Paper::parse(name)?;
    Ok(if portrait {
        paper.portrait()
    } else {
        paper.landscape()
    })
}

/// The drawing aids asked for on the command line.
pub fn aid_settings(args: &AidArgs) -> AidSettings {
    let base = if args.aids {
        AidSettings::all()
    } else {
        AidSettings::default()
    };
    let mut settings = AidSettings {
        grid_step_deg: args.grid.unwrap_or(base.grid_step_deg),
        grid_major_every: args.grid_major.unwrap_or(base.grid_major_every),
        labels: base.labels || args.labels,
        item_labels: base.item_labels || args.item_labels,
        vanishing_points: base.vanishing_points || args.vanishing,
        text_height_px: args.text_height,
        ..base
    };
    let guides = &mut settings.guides;
    guides.bearings.clone_from(&args.bearing);
    guides.slopes.clone_from(&args.slope);
    guides.fans.clone_from(&args.fan);
    guides.meridians.clone_from(&args.meridian);
    guides.poles.clone_from(&args.pole);
    guides.divisions = args
        .divide
        .iter()
        .chain(&args.divide_edges)
        .cloned()
        .collect();
    settings
}

/// The thumbnails of `sheet`.
pub fn contact_settings(args: &SheetArgs) -> pansite::Result<ContactSettings> {
    let thumbnail = RenderSettings {
        width: args.thumb.0,
        height: args.thumb.1,
        line_weight_px: 1.0,
        overlays: !args.bare,
        hidden: args.hidden.map(HiddenEdges::from),
        dpi: args.out.dpi,
        sun: sun_choice(&args.sun)?,
        ..RenderSettings::default()
    };
    thumbnail.validate()?;
    Ok(ContactSettings {
        thumbnail,
        columns: args.columns,
        dpi: args.out.dpi,
        moments: Vec::new(),
        label_cuts: (Vec::new(), Vec::new()),
    })
}

/// The plan of `plan`, and with `--beside` the panorama printed next to it.
pub fn plan_settings(args: &PlanArgs) -> pansite::Result<(PlanSettings, RenderSettings)> {
    let mut plan = PlanSettings {
        width: args.size.0,
        height: args.size.1,
        dpi: args.out.dpi,
        scale: args.scale.map_or(PlanScale::Standard, PlanScale::Exact),
        ..PlanSettings::default()
    };
    let panorama = RenderSettings {
        width: args.panorama_size.0,
        height: args.panorama_size.1,
        dpi: args.out.dpi,
        ..RenderSettings::default()
    };
    if args.beside {
        panorama.validate()?;
        // Beside the panorama the plan takes its height.
        plan.height = args.panorama_size.1;
    }
    Ok((plan, panorama))
}

/// The perspective view of `preview`.
pub fn preview_settings(args: &PreviewArgs) -> PreviewSettings {
    PreviewSettings {
        width: args.size.0,
        height: args.size.1,
        fov_deg: args.fov,
        hidden: args.hidden.map(HiddenEdges::from),
        ..PreviewSettings::default()
    }
}

/// The sun and shadows asked for: `--date` and `--time` go together.
pub fn sun_choice(args: &SunArgs) -> pansite::Result<SunChoice> {
    let moment = match (&args.date, &args.time) {
        (Some(date), Some(time)) => Some(LocalMoment::parse(date, time)?),
        (None, None) => None,
        _ => {
            return Err(Error::Setting(
                "--date and --time go together: give both".into(),
            ))
        }
    };
    if let Some(h) = args.hatch {
        if !(h.is_finite() && (0.01..=100.0).contains(&h)) {
            return Err(Error::Setting(format!(
                "--hatch {h}: expected a spacing from 0.01 to 100 metres"
            )));
        }
    }
    Ok(SunChoice {
        moment,
        path: args.no_sun_path.then_some(false),
        seasons: args.seasons.then_some(true),
        shadows: args.no_shadows.then_some(false),
        hatch_m: args.hatch,
        tone: args.shade_tone.then_some(true),
    })
}

/// A sweep of times for `sheet --times FROM,TO,MINUTES`, on the --date (or the scene's).
pub fn time_sweep(
    text: &str,
    args: &SunArgs,
    site: &Site,
) -> pansite::Result<(LocalMoment, jiff::civil::Time, f64)> {
    let bad = || {
        Error::Setting(format!(
            "--times {text}: expected FROM,TO,MINUTES such as 08:00,18:00,60"
        ))
    };
    let parts: Vec<&str> = text.split(',').collect();
    let [from, to, step] = parts[..] else {
        return Err(bad());
    };
    let date = match (&args.date, &site.sun) {
        (Some(date), _) => parse_date(date)?,
        (None, Some(sun)) => sun.date.0,
        (None, None) => {
            return Err(Error::Setting(
                "--times needs a day: give --date or a `sun` block in the scene".into(),
            ))
        }
    };
    let (from, _) = parse_time(from)?;
    let (to, _) = parse_time(to)?;
    let step: f64 = step.trim().parse().map_err(|_| bad())?;
    Ok((
        LocalMoment {
            date,
            time: from,
            offset_s: None,
        },
        to,
        step,
    ))
}

/// What `daylight` lists.
pub fn daylight_request(args: &DaylightArgs, site: &Site) -> pansite::Result<TableRequest> {
    let from = match (&args.date, &site.sun) {
        (Some(date), _) => parse_date(date)?,
        (None, Some(sun)) => sun.date.0,
        (None, None) => {
            return Err(Error::Setting(
                "give the day with --date (or a `sun` block in the scene)".into(),
            ))
        }
    };
    let to = args
        .to
        .as_deref()
        .map(parse_date)
        .transpose()?
        .unwrap_or(from);
    if let Some(step) = args.step {
        if !(step.is_finite() && step >= 1.0) {
            return Err(Error::Setting(format!(
                "--step {step}: expected at least one minute"
            )));
        }
    }
    Ok(TableRequest {
        from,
        to,
        step_s: args.step.map(|minutes| minutes * 60.0),
        item: args.item.clone(),
        blocking: args.blocking,
    })
}

/// The image `angles` gives pixel positions in.
pub fn table_map(args: &AnglesArgs) -> pansite::Result<Equirect> {
    RenderSettings {
        width: args.size.0,
        height: args.size.1,
        ..RenderSettings::default()
    }
    .validate()?;
    Ok(Equirect::from_size_px(
        args.size.0 as f64,
        args.size.1 as f64,
    ))
}

/// The sheets a `plan` or `sheet` page is split over, if any.
pub fn tiling(args: &TileArgs) -> Option<Tiling> {
    args.tiles.map(|(columns, rows)| Tiling {
        columns,
        rows,
        overlap_mm: args.overlap,
    })
}
