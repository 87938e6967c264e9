//! Command-line interface: the only module that knows argv, stdout, stderr and progress bars.
use crate::case::{load_case, Case, Fineness};
use crate::error::Error;
use crate::geometry::Section;
use crate::plot::PlotOptions;
use crate::report;
use crate::simulate::{self, Progress};
use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

/// Ground heat loss and frost depth under slab-on-ground foundations, from a 2D freezing-soil model.
#[derive(Parser, Debug)]
#[command(name = "frostline", version, about, propagate_version = true)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// Subcommands.
#[derive(Subcommand, Debug)]
pub enum Command {
    /// Simulate a case: steady start, spin-up to a periodic year, results and files.
    #[command(
        after_help = "Examples:\n  frostline run examples/kettle-hollow-house.toml --out out/kettle\n  \
        frostline run case.toml --out out/quick --mesh coarse --max-spin-up-years 3 --quiet\n\n\
        Writes summary.json, daily.csv, monthly.csv, probes.csv and field_<day>.csv into --out."
    )]
    Run(RunArgs),
    /// Re-render the plots (and report.html) of a finished run from its saved results.
    #[command(
        after_help = "Examples:\n  frostline plot out/kettle\n  frostline plot out/kettle --day 60 --zoom -1,2,-0.4,2.5 --animate"
    )]
    Plot(PlotArgs),
    /// Statistics of a measured daily or hourly temperature series: mean, annual sinusoid,
    /// freezing index of every winter, design freezing index.
    #[command(
        after_help = "Examples:\n  frostline climate climate/kettle-hollow.csv\n  \
        frostline climate station.csv --return-period 50 --fit mle --out out/station\n\n\
        File layout: comment lines start with #; a header with `date` and `temperature_c` (or\n\
        `temperature_f`); ISO 8601 dates or date-times in time order. Gaps up to --max-gap-days\n\
        are filled by linear interpolation."
    )]
    Climate(ClimateArgs),
    /// Thermal properties of a library soil (or list the library).
    #[command(
        after_help = "Examples:\n  frostline soil --list\n  frostline soil silty-sand\n  frostline soil silt --water-content 0.28 --method kersten"
    )]
    Soil(SoilArgs),
    /// Size frost-protection insulation: the least insulation (the case's [sizing] dimensions)
    /// keeping frost above the footing base with a margin.
    #[command(
        after_help = "Examples:\n  frostline size examples/kettle-hollow-sizing.toml --out out/sizing\n  \
        frostline size case.toml --margin 0.1 --out out/sizing -j 2\n\n\
        Writes sizing.json, sizing.csv and chosen_case.toml (a complete case that `frostline run` accepts)."
    )]
    Size(SizeArgs),
    /// Validate a case and print the mesh size and derived quantities, without solving.
    #[command(after_help = "Example:\n  frostline check examples/kettle-hollow-house.toml")]
    Check {
        /// The case file (TOML).
        case: PathBuf,
    },
}

/// Mesh fineness on the command line.
#[derive(ValueEnum, Clone, Copy, Debug)]
pub enum MeshArg {
    /// 5 cm cells at edges.
    Coarse,
    /// 2 cm cells at edges.
    Normal,
    /// 1 cm cells at edges.
    Fine,
}

impl From<MeshArg> for Fineness {
    fn from(m: MeshArg) -> Self {
        match m {
            MeshArg::Coarse => Fineness::Coarse,
            MeshArg::Normal => Fineness::Normal,
            MeshArg::Fine => Fineness::Fine,
        }
    }
}

/// Arguments of `run`.
#[derive(Args, Debug)]
pub struct RunArgs {
    /// The case file (TOML).
    pub case: PathBuf,
    /// Output directory (created if missing).
    #[arg(long, short)]
    pub out: PathBuf,
    /// Override the case's mesh fineness.
    #[arg(long, value_enum)]
    pub mesh: Option<MeshArg>,
    /// Override the case's maximum number of spin-up years.
    #[arg(long)]
    pub max_spin_up_years: Option<usize>,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
    /// Do not write plots and report.html.
    #[arg(long)]
    pub no_plots: bool,
    /// Also write soil_temperature.gif, the field through the year.
    #[arg(long)]
    pub animate: bool,
}

/// Gumbel fitting method on the command line.
#[derive(ValueEnum, Clone, Copy, Debug)]
pub enum FitArg {
    /// L-moments (default; robust for short records).
    Lmoments,
    /// Maximum likelihood.
    Mle,
}

/// Arguments of `climate`.
#[derive(Args, Debug)]
pub struct ClimateArgs {
    /// The series file (CSV).
    pub series: PathBuf,
    /// Return period of the design freezing index, years.
    #[arg(long, default_value_t = 100.0)]
    pub return_period: f64,
    /// Gumbel fitting method.
    #[arg(long, value_enum, default_value_t = FitArg::Lmoments)]
    pub fit: FitArg,
    /// Longest gap (days) filled by interpolation.
    #[arg(long, default_value_t = 3)]
    pub max_gap_days: usize,
    /// Write climate_summary.json into this directory.
    #[arg(long)]
    pub out: Option<PathBuf>,
}

/// Arguments of `size`.
#[derive(Args, Debug)]
pub struct SizeArgs {
    /// The case file with a [sizing] table.
    pub case: PathBuf,
    /// Required frost margin, m (footing base depth − frost depth under the footing); overrides
    /// sizing.margin_m.
    #[arg(long, allow_hyphen_values = true)]
    pub margin: Option<f64>,
    /// Output directory.
    #[arg(long, short)]
    pub out: PathBuf,
    /// Worker threads (default: all cores).
    #[arg(short = 'j', long)]
    pub jobs: Option<usize>,
    /// Override the case's mesh fineness.
    #[arg(long, value_enum)]
    pub mesh: Option<MeshArg>,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
}

/// Arguments of `soil`.
#[derive(Args, Debug)]
pub struct SoilArgs {
    /// Library name (see --list).
    pub name: Option<String>,
    /// List the library.
    #[arg(long)]
    pub list: bool,
    /// Override the dry density, kg/m³.
    #[arg(long)]
    pub dry_density: Option<f64>,
    /// Override the water content, fraction of dry mass.
    #[arg(long)]
    pub water_content: Option<f64>,
    /// Override the quartz fraction of the solids.
    #[arg(long)]
    pub quartz: Option<f64>,
    /// Conductivity method.
    #[arg(long, value_enum, default_value_t = MethodArg::Johansen)]
    pub method: MethodArg,
}

/// Soil conductivity method on the command line.
#[derive(ValueEnum, Clone, Copy, Debug)]
pub enum MethodArg {
    /// Johansen (1975).
    Johansen,
    /// Kersten (1949).
    Kersten,
}

/// Arguments of `plot`.
#[derive(Args, Debug)]
pub struct PlotArgs {
    /// Directory of a finished run (its --out).
    pub dir: PathBuf,
    /// Day of year of the field plots (default: the day of deepest frost).
    #[arg(long)]
    pub day: Option<usize>,
    /// Window of the zoomed field plot: x0,x1,z0,z1 in m (e.g. -1.5,2.5,-0.3,2.2).
    #[arg(long, allow_hyphen_values = true)]
    pub zoom: Option<String>,
    /// Also write soil_temperature.gif.
    #[arg(long)]
    pub animate: bool,
}

/// Run the CLI and return the process exit code (0 ok, 2 bad input or usage, 1 failure).
pub fn main_exit_code() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return e.exit_code();
        }
    };
    match execute(cli) {
        Ok(()) => 0,
        Err(e) => {
            eprintln!("error: {e}");
            if e.is_input() {
                2
            } else {
                1
            }
        }
    }
}

fn execute(cli: Cli) -> Result<(), Error> {
    match cli.command {
        Command::Check { case } => {
            let case = load_case(&case)?;
            print!("{}", check_text(&case)?);
            Ok(())
        }
        Command::Size(a) => {
            let mut case = load_case(&a.case)?;
            if let Some(m) = a.mesh {
                case.simulation.mesh = m.into();
            }
            if let (Some(m), Some(s)) = (a.margin, case.sizing.as_mut()) {
                if !(-1.0..=2.0).contains(&m) {
                    return Err(Error::Input {
                        location: crate::error::Location::file_only("command line"),
                        key: "--margin".into(),
                        message: format!("{m} m is out of range; allowed: -1 to 2 m"),
                    });
                }
                s.margin_m = m;
            }
            if let Some(j) = a.jobs {
                let _ = rayon::ThreadPoolBuilder::new()
                    .num_threads(j.max(1))
                    .build_global();
            }
            let bar = if a.quiet {
                indicatif::ProgressBar::hidden()
            } else {
                indicatif::ProgressBar::new_spinner()
            };
            bar.set_message("model runs");
            let cb = |n: usize| bar.set_message(format!("{n} model runs"));
            let result = crate::design::size(&case, &cb);
            bar.finish_and_clear();
            let result = result?;
            let mut files = crate::report::sizing::write(&case, &result, &a.out)?;
            // The chosen design, run as the case file written for it: its full results, plots and
            // report (with the sizing) in the same directory.
            if result.chosen.is_some() {
                let chosen = load_case(&a.out.join("chosen_case.toml"))?;
                let r = simulate::run(&chosen, &mut |_| {})?;
                files.extend(report::write_outputs(&chosen, &r, &a.out)?);
                files.extend(crate::plot::render_dir(&a.out, &PlotOptions::default())?);
                files.push(crate::report::html::write_report(&a.out)?);
            }
            print!("{}", crate::report::sizing::text(&case, &result));
            print_files(&a.out, &files);
            Ok(())
        }
        Command::Soil(a) => {
            print!("{}", soil_text(&a)?);
            Ok(())
        }
        Command::Climate(a) => {
            use crate::physics::climate::{read_series, summarize, FitMethod, ReadOptions};
            if !(a.return_period > 1.0 && a.return_period <= 10_000.0) {
                return Err(Error::Input {
                    location: crate::error::Location::file_only("command line"),
                    key: "--return-period".into(),
                    message: format!(
                        "{} is out of range; allowed: more than 1 and at most 10000 years",
                        a.return_period
                    ),
                });
            }
            let opts = ReadOptions {
                max_gap_days: a.max_gap_days,
                ..Default::default()
            };
            let series = read_series(&a.series, &opts)?;
            let method = match a.fit {
                FitArg::Lmoments => FitMethod::LMoments,
                FitArg::Mle => FitMethod::MaximumLikelihood,
            };
            let s = summarize(&series, a.return_period, method)?;
            print!("{}", climate_text(&s));
            if let Some(dir) = a.out {
                std::fs::create_dir_all(&dir).map_err(|e| Error::Io {
                    path: dir.clone(),
                    source: e,
                })?;
                let json =
                    serde_json::to_vec_pretty(&s).map_err(|e| Error::Output(e.to_string()))?;
                let p = crate::report::write_atomic(&dir, "climate_summary.json", &json)?;
                println!("\n  wrote {}", p.display());
            }
            Ok(())
        }
        Command::Plot(a) => {
            let zoom = match a.zoom {
                None => None,
                Some(text) => {
                    let v: Vec<f64> = text
                        .split(',')
                        .filter_map(|x| x.trim().parse().ok())
                        .collect();
                    if v.len() != 4 || text.split(',').count() != 4 {
                        return Err(Error::Input {
                            location: crate::error::Location::file_only("command line"),
                            key: "--zoom".into(),
                            message: format!(
                                "\"{text}\" is not four numbers; allowed: x0,x1,z0,z1 in m"
                            ),
                        });
                    }
                    Some([v[0], v[1], v[2], v[3]])
                }
            };
            let opts = PlotOptions {
                day_of_year: a.day,
                zoom,
                animate: a.animate,
            };
            let mut files = crate::plot::render_dir(&a.dir, &opts)?;
            files.push(crate::report::html::write_report(&a.dir)?);
            for f in files {
                println!("{}", f.display());
            }
            Ok(())
        }
        Command::Run(a) => {
            let mut case = load_case(&a.case)?;
            if let Some(m) = a.mesh {
                case.simulation.mesh = m.into();
            }
            if let Some(y) = a.max_spin_up_years {
                if !(1..=100).contains(&y) {
                    return Err(Error::Input {
                        location: crate::error::Location::file_only("command line"),
                        key: "--max-spin-up-years".into(),
                        message: format!("{y} is out of range; allowed: 1 to 100"),
                    });
                }
                case.simulation.max_spin_up_years = y;
            }
            let bar = if a.quiet {
                indicatif::ProgressBar::hidden()
            } else {
                let b = indicatif::ProgressBar::new(
                    ((case.simulation.max_spin_up_years + 1) * 365) as u64,
                );
                if let Ok(style) = indicatif::ProgressStyle::with_template(
                    "{spinner} year {msg} [{bar:30}] {elapsed}",
                ) {
                    b.set_style(style.progress_chars("=> "));
                }
                b
            };
            let mut cb = |p: Progress| {
                if p.day == 1 {
                    bar.set_message(format!("{}", p.year + 1));
                }
                bar.set_position((p.year * 365 + p.day) as u64);
            };
            let result = simulate::run(&case, &mut cb);
            bar.finish_and_clear();
            let result = result?;
            let mut files = report::write_outputs(&case, &result, &a.out)?;
            if !a.no_plots {
                let opts = PlotOptions {
                    animate: a.animate,
                    ..Default::default()
                };
                files.extend(crate::plot::render_dir(&a.out, &opts)?);
                files.push(crate::report::html::write_report(&a.out)?);
            }
            print!("{}", report::result_table(&case, &result));
            print_files(&a.out, &files);
            Ok(())
        }
    }
}

/// The text `check` prints: geometry, mesh, and the closed-form estimates.
pub fn check_text(case: &Case) -> Result<String, Error> {
    let section = Section::from_case(case)?;
    let mesh = section.mesh(case);
    let c = simulate::cross_check(case);
    let mut s = format!("{}: case is valid\n", case.name);
    s += &format!(
        "  B' = {:.3} m (A {:.1} m², P {:.1} m)\n",
        case.building.b_prime_m, case.building.floor_area_m2, case.building.exposed_perimeter_m
    );
    s += &format!(
        "  section: x {:.2} … {:.2} m, z {:.2} … {:.2} m\n",
        section.x_min, section.x_max, section.z_top, section.z_bottom
    );
    s += &format!(
        "  mesh ({:?}): {} × {} grid, {} solid cells\n",
        case.simulation.mesh,
        mesh.grid.nx(),
        mesh.grid.nz(),
        mesh.solid_cells()
    );
    let sim = &case.simulation;
    let coarse = match sim.coarse_year_step_days {
        0 => String::new(),
        d => format!("one year at {d}-day steps, then "),
    };
    s += &format!(
        "  time: spin-up {coarse}{} to {} years in {} h steps\n",
        sim.min_spin_up_years,
        sim.max_spin_up_years,
        sim.dt_s / 3600.0
    );
    s += &format!("  soil (top stratum): k {:.3}/{:.3} W/(m·K) unfrozen/frozen, C {:.2}/{:.2} MJ/(m³·K), L {:.1} MJ/m³\n",
        case.strata[0].material.k_unfrozen, case.strata[0].material.k_frozen,
        case.strata[0].material.c_unfrozen / 1e6, case.strata[0].material.c_frozen / 1e6, case.strata[0].material.latent / 1e6);
    let kind = match (&case.climate.source, &case.climate.design) {
        (crate::case::ClimateSource::Series(sr), _) => {
            format!("measured series {} ({} days)", sr.source, sr.values.len())
        }
        (_, Some(d)) => format!(
            "design year from {} ({:.0}-year index {:.0} °C·d)",
            d.series, d.return_period_years, d.design_freezing_index_c_days
        ),
        _ => "sinusoid".into(),
    };
    s += &format!(
        "  climate: {kind}; mean {:.2} °C, amplitude {:.2} K, coldest day {:.0}\n",
        case.climate.mean_c, case.climate.amplitude_k, case.climate.coldest_day
    );
    s += &format!(
        "  surface freezing index {:.0} °C·d over {:.0} d\n",
        c.freezing_index_c_days, c.freezing_season_days
    );
    if let Some(sz) = &case.sizing {
        s += &format!(
            "  sizing: margin {:.2} m, {} varied dimension(s)\n",
            sz.margin_m,
            sz.vary.len()
        );
    }
    s += &format!(
        "  ISO 13370: d_t {:.3} m, U0 {:.3}, Ψ_edge {:.3} W/(m·K), U {:.3} W/(m²·K)\n",
        c.iso13370_dt_m,
        c.iso13370_u0_w_per_m2k,
        c.iso13370_edge_psi_w_per_mk,
        c.iso13370_u_value_w_per_m2k
    );
    s += &format!("  open-ground frost depth: Stefan {:.2} m, modified Berggren {:.2} m; footing base {:.2} m\n",
        c.stefan_frost_depth_m, c.modified_berggren_frost_depth_m, case.footing.base_depth_m);
    Ok(s)
}

/// The table `climate` prints.
pub fn climate_text(s: &crate::physics::climate::ClimateSummary) -> String {
    let mut t = format!(
        "{}: {} to {} ({:.1} years, {} days filled)\n",
        s.source, s.first_date, s.last_date, s.years, s.filled_days
    );
    t += &format!(
        "  mean annual temperature          {:>8.2} °C\n",
        s.mean_annual_temperature_c
    );
    t += &format!(
        "  annual sinusoid amplitude        {:>8.2} K, coldest on day {:.0}\n",
        s.annual_amplitude_k, s.coldest_day_of_year
    );
    t += "  freezing index by winter (°C·d):\n";
    for w in &s.freezing_index_by_winter_c_days {
        t += &format!(
            "    {}/{:02} {:>8.0}\n",
            w.winter,
            (w.winter + 1) % 100,
            w.value
        );
    }
    t += &format!(
        "  design freezing index, {:.0}-year   {:>8.0} °C·d (Gumbel {:?}: location {:.1}, scale {:.1}; KS D {:.3}, p {:.2})\n",
        s.return_period_years, s.design_freezing_index_c_days, s.fit_method, s.gumbel_location_c_days, s.gumbel_scale_c_days, s.ks_statistic, s.ks_p_value
    );
    t += &format!(
        "  mean of the 3 coldest winters    {:>8.0} °C·d\n",
        s.mean_of_three_coldest_c_days
    );
    t += &format!(
        "  coldest winter                   {:>8.0} °C·d\n",
        s.max_freezing_index_c_days
    );
    t
}

/// The text `soil` prints.
pub fn soil_text(a: &SoilArgs) -> Result<String, Error> {
    use crate::physics::library::{bundled_soil, soil_properties, KMethod, SOILS};
    let bad = |key: &str, message: String| Error::Input {
        location: crate::error::Location::file_only("command line"),
        key: key.into(),
        message,
    };
    if a.list || a.name.is_none() {
        let mut t =
            String::from("Soil library (typical values per class; replace with site data):\n");
        for (n, _) in SOILS {
            if let Some(s) = bundled_soil(n) {
                t += &format!(
                    "  {n:<16} {:<58} frost: {}\n",
                    s.description, s.frost_susceptibility
                );
            }
        }
        return Ok(t);
    }
    let name = a.name.as_deref().unwrap_or("");
    let mut s = bundled_soil(name).ok_or_else(|| {
        let names: Vec<&str> = SOILS.iter().map(|(n, _)| *n).collect();
        bad(
            "NAME",
            format!(
                "no soil \"{name}\" in the library; known: {}",
                names.join(", ")
            ),
        )
    })?;
    let changed = a.dry_density.is_some() || a.water_content.is_some() || a.quartz.is_some();
    let check =
        |v: Option<f64>, lo: f64, hi: f64, key: &str, unit: &str| -> Result<Option<f64>, Error> {
            match v {
                Some(x) if !(lo..=hi).contains(&x) => Err(bad(
                    key,
                    format!("{x} is out of range; allowed: {lo} to {hi} {unit}"),
                )),
                other => Ok(other),
            }
        };
    if let Some(v) = check(a.dry_density, 100.0, 2700.0, "--dry-density", "kg/m³")? {
        s.dry_density_kg_per_m3 = v;
    }
    if let Some(v) = check(
        a.water_content,
        0.0,
        5.0,
        "--water-content",
        "(fraction of dry mass)",
    )? {
        s.water_content = v;
    }
    if let Some(v) = check(a.quartz, 0.0, 1.0, "--quartz", "(fraction)")? {
        s.quartz_fraction = v;
    }
    if changed {
        s.k_unfrozen_w_per_mk = None;
        s.k_frozen_w_per_mk = None;
        s.c_unfrozen_j_per_m3k = None;
        s.c_frozen_j_per_m3k = None;
        s.latent_heat_j_per_m3 = None;
    }
    let method = match a.method {
        MethodArg::Johansen => KMethod::Johansen,
        MethodArg::Kersten => KMethod::Kersten,
    };
    let (ku, kf, cu, cf, l) = soil_properties(&s, method)
        .ok_or_else(|| bad("--method", "Kersten's fits need at least 7 % water (fine soils) or 1 % (coarse); allowed: --method johansen".into()))?;
    let explicit = s.k_unfrozen_w_per_mk.is_some();
    let mut t = format!(
        "{} ({name}): {}\n  source: {}\n",
        s.name, s.description, s.source
    );
    t += &format!("  dry density {:.0} kg/m³, water content {:.1} % of dry mass, quartz {:.0} %, texture {:?}, saturation {:.0} %\n",
        s.dry_density_kg_per_m3, 100.0 * s.water_content, 100.0 * s.quartz_fraction, s.texture, 100.0 * s.index().saturation());
    t += &format!("  frost susceptibility: {}\n", s.frost_susceptibility);
    t += &format!(
        "  conductivity ({}):  unfrozen {ku:.3} W/(m·K), frozen {kf:.3} W/(m·K)\n",
        if explicit {
            "explicit in the soil file"
        } else if matches!(method, KMethod::Kersten) {
            "Kersten 1949"
        } else {
            "Johansen 1975"
        }
    );
    t += &format!(
        "  volumetric heat capacity: unfrozen {:.3} MJ/(m³·K), frozen {:.3} MJ/(m³·K)\n",
        cu / 1e6,
        cf / 1e6
    );
    t += &format!(
        "  volumetric latent heat: {:.1} MJ/m³ (ρd · w · 333.7 kJ/kg)\n",
        l / 1e6
    );
    t += &format!("  diffusivity (unfrozen): {:.3e} m²/s\n", ku / cu);
    Ok(t)
}

/// List the files written in `dir`, by name.
fn print_files(dir: &std::path::Path, files: &[std::path::PathBuf]) {
    println!("\n  Files in {}:", dir.display());
    for f in files {
        println!(
            "    {}",
            f.file_name()
                .map(|s| s.to_string_lossy())
                .unwrap_or_default()
        );
    }
}
