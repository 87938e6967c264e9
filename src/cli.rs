//! The command line: argv, stdout, stderr, progress bars and exit codes (the only part of
//! frostline that knows them; the library never prints).
use clap::{Args, Parser, Subcommand, ValueEnum};
use frostline::case::{load_case, Case, Fineness, ModelKind};
use frostline::error::{Error, InputKind};
use frostline::physics::climate::FitMethod;
use frostline::physics::library::KMethod;
use frostline::plot::PlotOptions;
use frostline::report::{self, text};
use frostline::{estimate, files, run};
use std::path::{Path, PathBuf};

/// Ground heat loss and frost depth under slab-on-ground foundations, from a 2D freezing-soil model.
#[derive(Parser, Debug)]
#[command(name = "frostline", version, about, propagate_version = true)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
    /// How errors are printed on stderr: text, or one JSON object per line for tools (input
    /// errors with file, line, column, key, kind, message and allowed values).
    #[arg(long, global = true, value_enum, default_value_t = ErrorFormat::Text)]
    pub error_format: ErrorFormat,
}

/// Format of the error messages.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ErrorFormat {
    /// `error: FILE:LINE:COLUMN: KEY: MESSAGE`.
    Text,
    /// `{"error": {...}, "exit_code": N}` on one line.
    Json,
}

/// Subcommands.
#[derive(Subcommand, Debug)]
pub enum Command {
    /// Simulate a case: steady start, spin-up to a periodic year, results and files.
    #[command(
        after_help = "Examples:\n  frostline run examples/kettle-hollow-house.toml --out out/kettle\n  \
        frostline run case.toml --out out/quick --mesh coarse --max-spin-up-years 3 --quiet\n  \
        frostline run examples/alder-bend-house-3d.toml --out out/alder --model 3d\n\n\
        Writes summary.json, daily.csv, monthly.csv, probes.csv and field_<day>.csv into --out\n\
        (3D: also perimeter.csv, plan_frost.csv, daily_3d.csv, monthly_3d.csv, three_d.json)."
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
    /// Sample the case's [uncertainty] inputs (Latin hypercube), run every sample in parallel and
    /// report the spread of frost margin, frost depth and heat loss, the probability of frost in
    /// the protected zone and which input drives it.
    #[command(
        after_help = "Examples:\n  frostline uncertainty examples/kettle-hollow-uncertainty.toml --out out/spread --mesh coarse\n  \
        frostline uncertainty case.toml --out out/spread --shard 2/10   (one shard of ten, e.g. a Slurm array task)\n  \
        frostline merge out/spread/shard-*-of-10 --out out/spread-all\n\n\
        Writes samples.csv (every sample's inputs and results) and uncertainty.json (the statistics).\n\
        Under Slurm (SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT set) the shard defaults to the\n\
        array task, into OUT/shard-K-of-N; see docs/slurm-uncertainty.sh."
    )]
    Uncertainty(UncertaintyArgs),
    /// Run a list of cases (many sites, or variants of a design) in parallel, each like
    /// `frostline run` into its own directory, with one table of their design answers.
    #[command(
        after_help = "Examples:\n  frostline batch sites.txt --out out/sites --mesh coarse\n  \
        frostline batch sites.txt --out out/sites --shard 2/10   (one shard of ten, e.g. a Slurm array task)\n  \
        frostline merge out/sites/shard-*-of-10 --out out/sites-all\n\n\
        The list holds one case file per line (relative to the list), # comments. Writes batch.csv\n\
        (each case's frost margin, frost depths, heat loss, U and status), batch.json and\n\
        cases/NNN-NAME/ (each case's full results). Under Slurm the shard defaults to the array\n\
        task, into OUT/shard-K-of-N; see docs/slurm-batch.sh."
    )]
    Batch(BatchArgs),
    /// Merge the shard directories of one `frostline uncertainty` design or one `frostline batch`
    /// into one result (the same files and statistics as an unsharded run).
    #[command(
        after_help = "Examples:\n  frostline merge out/spread/shard-*-of-10 --out out/spread-all\n  \
        frostline merge out/sites/shard-*-of-10 --out out/sites-all"
    )]
    Merge(MergeArgs),
    /// Validate a case and print the mesh size and derived quantities, without solving.
    #[command(after_help = "Example:\n  frostline check examples/kettle-hollow-house.toml")]
    Check {
        /// The case file (TOML).
        case: PathBuf,
    },
    /// Print a shell completion script to standard output.
    #[command(
        after_help = "Examples:\n  frostline completions bash > ~/.local/share/bash-completion/completions/frostline\n  \
        frostline completions zsh > ~/.zfunc/_frostline"
    )]
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff) to standard output.
    #[command(after_help = "Example:\n  frostline man > frostline.1 && man ./frostline.1")]
    Man,
}

/// Mesh fineness on the command line.
#[derive(ValueEnum, Clone, Copy, Debug)]
pub enum MeshArg {
    /// 5 cm cells at edges (3D: 10 cm).
    Coarse,
    /// 2 cm cells at edges (3D: 5 cm).
    Normal,
    /// 1 cm cells at edges (3D: 2 cm).
    Fine,
}

/// Model on the command line.
#[derive(ValueEnum, Clone, Copy, Debug)]
pub enum ModelArg {
    /// The 2D section (ISO 13370 equivalent strip).
    #[value(name = "2d")]
    TwoD,
    /// The 3D quarter of the rectangular plan (needs [plan]).
    #[value(name = "3d")]
    ThreeD,
}

/// Options of the images a command draws.
#[derive(Args, Debug, Clone, Copy)]
pub struct ImageArgs {
    /// Resolution of the PNG images in dots per inch (48–600; default 96). The figures keep
    /// their layout and are drawn with more pixels, e.g. 300 for print. SVG images are vector
    /// graphics at any size; the animation stays at 96.
    #[arg(long, value_parser = clap::value_parser!(u32).range(48..=600))]
    pub dpi: Option<u32>,
}

/// Units of the results shown.
#[derive(ValueEnum, Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum UnitsArg {
    /// SI (m, W, kWh, °C).
    #[default]
    Si,
    /// US customary (ft, Btu/h, kBtu, °F), beside the SI files.
    Us,
}

impl From<UnitsArg> for files::us::Units {
    fn from(u: UnitsArg) -> Self {
        match u {
            UnitsArg::Si => files::us::Units::Si,
            UnitsArg::Us => files::us::Units::Us,
        }
    }
}

/// What `run` prints on standard output.
#[derive(ValueEnum, Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum FormatArg {
    /// The result table and the list of files written.
    #[default]
    Table,
    /// summary.json as written (for pipes and scripts); nothing else on standard output.
    Json,
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
    /// Override the case's model (simulation.model).
    #[arg(long, value_enum)]
    pub model: Option<ModelArg>,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
    /// Do not write plots and report.html.
    #[arg(long)]
    pub no_plots: bool,
    /// Also write soil_temperature.gif, the field through the year.
    #[arg(long)]
    pub animate: bool,
    #[command(flatten)]
    pub image: ImageArgs,
    /// Standard output: the result table, or summary.json for pipes.
    #[arg(long, value_enum, default_value_t = FormatArg::Table)]
    pub format: FormatArg,
    /// Units of the result table, the report and the extra `summary_us.json` and `*_us.csv`
    /// files (summary.json and the CSV files stay in SI).
    #[arg(long, value_enum, default_value_t = UnitsArg::Si)]
    pub units: UnitsArg,
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
    #[command(flatten)]
    pub image: ImageArgs,
    /// Units of the result table, the report and the extra `summary_us.json` and `*_us.csv`
    /// files (summary.json and the CSV files stay in SI).
    #[arg(long, value_enum, default_value_t = UnitsArg::Si)]
    pub units: UnitsArg,
}

/// The arguments of the commands that split their runs into shards (`uncertainty`, `batch`).
#[derive(Args, Debug)]
pub struct SplitArgs {
    /// Output directory (a shard writes into OUT/shard-K-of-N).
    #[arg(long, short)]
    pub out: PathBuf,
    /// Run only shard K of N (1-based), e.g. 3/10: the samples (or listed cases) i, counted from
    /// 0, with i mod N = K − 1. Default: the Slurm array task (task (ID − MIN)/STEP + 1 of COUNT,
    /// from SLURM_ARRAY_TASK_ID, _MIN, _STEP and _COUNT) when set, else all of them;
    /// `--shard 1/1` runs all inside an array job.
    #[arg(long)]
    pub shard: Option<String>,
    /// Worker threads (default: all cores).
    #[arg(short = 'j', long)]
    pub jobs: Option<usize>,
    /// Override the case's (every case's) mesh fineness.
    #[arg(long, value_enum)]
    pub mesh: Option<MeshArg>,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
}

/// Arguments of `uncertainty`.
#[derive(Args, Debug)]
pub struct UncertaintyArgs {
    /// The case file with an [uncertainty] table.
    pub case: PathBuf,
    #[command(flatten)]
    pub split: SplitArgs,
    /// Override the number of samples.
    #[arg(long)]
    pub samples: Option<usize>,
    /// Override the seed.
    #[arg(long)]
    pub seed: Option<u64>,
    /// Units of the printed summary, report.html and plots (uncertainty.json and samples.csv
    /// stay in SI; the inputs stay in their keys' own units).
    #[arg(long, value_enum, default_value_t = UnitsArg::Si)]
    pub units: UnitsArg,
}

/// Arguments of `batch`.
#[derive(Args, Debug)]
pub struct BatchArgs {
    /// The list of case files: one per line, relative to the list file; # starts a comment.
    pub list: PathBuf,
    #[command(flatten)]
    pub split: SplitArgs,
    /// Do not write each case's plots and report.html.
    #[arg(long)]
    pub no_plots: bool,
    /// Units of each case's result table, report and extra US files (the data files and
    /// batch.csv stay in SI).
    #[arg(long, value_enum, default_value_t = UnitsArg::Si)]
    pub units: UnitsArg,
}

/// Arguments of `merge`.
#[derive(Args, Debug)]
pub struct MergeArgs {
    /// The shard directories (each with samples.csv and uncertainty.json, or batch.csv and
    /// batch.json).
    #[arg(required = true)]
    pub dirs: Vec<PathBuf>,
    /// Output directory.
    #[arg(long, short)]
    pub out: PathBuf,
    /// Units of an uncertainty merge's summary, report and plots (default: the first shard's).
    /// A batch's cases keep the units they were run with.
    #[arg(long, value_enum)]
    pub units: Option<UnitsArg>,
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
    /// Day of year of the field plots (default: the design day, the least frost margin).
    #[arg(long)]
    pub day: Option<usize>,
    /// Window of the zoomed field plot: x0,x1,z0,z1 in m (e.g. -1.5,2.5,-0.3,2.2).
    #[arg(long, allow_hyphen_values = true)]
    pub zoom: Option<String>,
    /// Also write soil_temperature.gif.
    #[arg(long)]
    pub animate: bool,
    /// Write the plots, the drawn day's field CSV and report.html into this directory instead of
    /// the run directory (created if missing), so the run's own figures stay as they are.
    #[arg(long, short)]
    pub out: Option<PathBuf>,
    #[command(flatten)]
    pub image: ImageArgs,
}

impl From<FitArg> for FitMethod {
    fn from(f: FitArg) -> Self {
        match f {
            FitArg::Lmoments => FitMethod::LMoments,
            FitArg::Mle => FitMethod::MaximumLikelihood,
        }
    }
}

impl From<MethodArg> for KMethod {
    fn from(m: MethodArg) -> Self {
        match m {
            MethodArg::Johansen => KMethod::Johansen,
            MethodArg::Kersten => KMethod::Kersten,
        }
    }
}

/// Exit code when results were written but a stated criterion was not met.
pub const EXIT_CRITERION: i32 = 3;

/// Exit code: 0 ok; 2 bad input or usage; 1 runtime or I/O failure; 3 results written but a
/// stated criterion not met (not periodic, frost in the protected zone, no design within the
/// bounds).
pub fn main_exit_code() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            // The flag cannot be read from a command line that does not parse: look for it.
            let args: Vec<String> = std::env::args().collect();
            let json = args
                .windows(2)
                .any(|w| w[0] == "--error-format" && w[1] == "json")
                || args.iter().any(|a| a == "--error-format=json");
            let code = e.exit_code();
            if json && code != 0 {
                eprintln!(
                    "{}",
                    serde_json::json!({
                        "error": {"class": "usage", "message": e.to_string().trim()},
                        "exit_code": code,
                    })
                );
            } else {
                let _ = e.print();
            }
            return code;
        }
    };
    let format = cli.error_format;
    match execute(cli) {
        Ok(unmet) if unmet.is_empty() => 0,
        Ok(unmet) => {
            if format == ErrorFormat::Json {
                eprintln!(
                    "{}",
                    serde_json::json!({"criteria_not_met": unmet, "exit_code": EXIT_CRITERION})
                );
            } else {
                for u in unmet {
                    eprintln!("criterion not met: {u}");
                }
            }
            EXIT_CRITERION
        }
        Err(e) => {
            let code = if e.is_input() { 2 } else { 1 };
            if format == ErrorFormat::Json {
                // `error` is the first (or only) error; `errors` lists every independent one.
                let all: Vec<_> = e.each().iter().map(|e| e.to_json()).collect();
                eprintln!(
                    "{}",
                    serde_json::json!({"error": e.to_json(), "errors": all, "exit_code": code})
                );
            } else {
                for e in e.each() {
                    eprintln!("error: {e}");
                }
            }
            code
        }
    }
}

/// `print!` through [`write_stdout`]: a closed pipe (`frostline run … | head`) ends the output
/// quietly instead of a panic.
macro_rules! say {
    ($($t:tt)*) => {
        let _ = write_stdout(format!($($t)*).as_bytes());
    };
}

/// `println!` through [`write_stdout`].
macro_rules! sayln {
    () => {
        say!("\n")
    };
    ($($t:tt)*) => {
        say!("{}\n", format!($($t)*))
    };
}

/// Write `bytes` to standard output; a closed pipe (`| head`) is not an error.
fn write_stdout(bytes: &[u8]) -> Result<(), Error> {
    use std::io::Write;
    match std::io::stdout().write_all(bytes) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
            Err(Error::io(Path::new("standard output"), e))
        }
        _ => Ok(()),
    }
}

/// Run a command; returns the stated criteria the results do not meet (empty: all met).
fn execute(cli: Cli) -> Result<Vec<String>, Error> {
    match cli.command {
        Command::Check { case } => {
            say!("{}", text::check_text(&load_case(&case)?)?);
            Ok(Vec::new())
        }
        Command::Size(a) => size(a),
        Command::Uncertainty(a) => uncertainty(a),
        Command::Batch(a) => batch(a),
        Command::Merge(a) => merge(a),
        Command::Soil(a) => {
            say!("{}", soil(&a)?);
            Ok(Vec::new())
        }
        Command::Climate(a) => climate(a).map(|_| Vec::new()),
        Command::Plot(a) => plot(a).map(|_| Vec::new()),
        Command::Run(a) => run_case(a),
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut buf = Vec::new();
            clap_complete::generate(shell, &mut cmd, "frostline", &mut buf);
            write_stdout(&buf)?;
            Ok(Vec::new())
        }
        Command::Man => {
            let cmd = <Cli as clap::CommandFactory>::command();
            let mut buf = Vec::new();
            clap_mangen::Man::new(cmd)
                .render(&mut buf)
                .map_err(|e| Error::io(Path::new("standard output"), e))?;
            write_stdout(&buf)?;
            Ok(Vec::new())
        }
    }
}

/// The stated criteria a run's summary does not meet.
fn unmet(s: &files::Summary) -> Vec<String> {
    let mut u = Vec::new();
    if !s.spin_up_converged {
        u.push(format!(
            "the spin-up did not reach a periodic year ({}); raise simulation.max_spin_up_years",
            s.spin_up_criterion
        ));
    }
    if s.frost_in_protected_zone {
        u.push(format!(
            "frost enters the protected zone below the footing (margin {:.2} m)",
            s.frost_margin_m
        ));
    }
    if let Some(t) = &s.three_d {
        if !t.spin_up_converged {
            u.push(
                "the 3D spin-up did not reach a periodic year; raise simulation.max_spin_up_years"
                    .into(),
            );
        }
        if t.headline.frost_in_protected_zone {
            let at = t.worst_point.map_or(String::new(), |w| {
                format!(
                    " at X = {:.2} m, Y = {:.2} m, z = {:.2} m",
                    w.x_m, w.y_m, w.z_m
                )
            });
            u.push(format!(
                "3D: frost enters the protected zone below the footing (margin {:.2} m{at})",
                t.headline.frost_margin_m
            ));
        }
    }
    u
}

/// A range check of a command-line value.
fn flag_range<T: PartialOrd + std::fmt::Display>(
    v: T,
    (lo, hi): (T, T),
    key: &str,
    allowed: &str,
) -> Result<T, Error> {
    if v >= lo && v <= hi {
        Ok(v)
    } else {
        Err(Error::command_line(
            key,
            InputKind::OutOfRange,
            format!("{v} is out of range; allowed: {allowed}"),
        ))
    }
}

/// A progress spinner or bar, hidden with --quiet (and by indicatif when stderr is no terminal).
fn bar(quiet: bool, len: Option<u64>) -> indicatif::ProgressBar {
    if quiet {
        return indicatif::ProgressBar::hidden();
    }
    match len {
        None => indicatif::ProgressBar::new_spinner(),
        Some(n) => {
            let b = indicatif::ProgressBar::new(n);
            if let Ok(style) =
                indicatif::ProgressStyle::with_template("{spinner} year {msg} [{bar:30}] {elapsed}")
            {
                b.set_style(style.progress_chars("=> "));
            }
            b
        }
    }
}

fn run_case(a: RunArgs) -> Result<Vec<String>, Error> {
    let mut case = load_case(&a.case)?;
    if let Some(m) = a.mesh {
        case.simulation.mesh = m.into();
    }
    if let Some(y) = a.max_spin_up_years {
        case.simulation.max_spin_up_years =
            flag_range(y, (1, 100), "--max-spin-up-years", "1 to 100")?;
    }
    match a.model {
        Some(ModelArg::TwoD) => case.simulation.model = ModelKind::TwoD,
        Some(ModelArg::ThreeD) => {
            if case.plan.is_none() {
                return Err(Error::in_file(&case.file, "plan", InputKind::Missing, "--model 3d needs the building's plan; add [plan] with length_m and width_m (exterior faces of the foundation wall)"));
            }
            case.simulation.model = ModelKind::ThreeD;
        }
        None => {}
    }
    let bar = bar(
        a.quiet,
        Some(((case.simulation.max_spin_up_years + 1) * 365) as u64),
    );
    let mut cb = |p: run::Progress| {
        if p.day == 1 {
            bar.set_message(format!("{}", p.year + 1));
        }
        bar.set_position((p.year * 365 + p.day) as u64);
    };
    let _lock = files::check_writable(&a.out)?;
    let three = case.simulation.model == ModelKind::ThreeD;
    if three {
        bar.set_message("2D section, then 3D");
    }
    let opts = frostline::batch::RunInto {
        units: a.units.into(),
        plots: !a.no_plots,
        animate: a.animate,
        dpi: a.image.dpi,
    };
    let written = frostline::batch::run_into(&case, &a.out, &opts, &mut cb);
    bar.finish_and_clear();
    let written = written?;
    let summary = files::read_summary(&a.out)?;
    if a.format == FormatArg::Json {
        say!("{}", files::read_text(&a.out, "summary.json")?);
    } else {
        say!("{}", text::result_table(&summary));
        print_files(&a.out, &written);
    }
    Ok(unmet(&summary))
}

fn size(a: SizeArgs) -> Result<Vec<String>, Error> {
    let mut case: Case = load_case(&a.case)?;
    if let Some(m) = a.mesh {
        case.simulation.mesh = m.into();
    }
    if let (Some(m), Some(s)) = (a.margin, case.sizing.as_mut()) {
        s.margin_m = flag_range(m, (-1.0, 2.0), "--margin", "-1 to 2 m")?;
    }
    if case.sizing.is_none() {
        return Err(Error::in_file(
            &case.file,
            "sizing",
            InputKind::Missing,
            "the case has no [sizing] table; `frostline size` needs one",
        ));
    }
    if let Some(j) = a.jobs {
        let _ = rayon::ThreadPoolBuilder::new()
            .num_threads(j.max(1))
            .build_global();
    }
    let _lock = files::check_writable(&a.out)?;
    let bar = bar(a.quiet, None);
    bar.set_message("model runs");
    let cb = |n: usize| bar.set_message(format!("{n} model runs"));
    let result = frostline::design::size(&case, &cb);
    bar.finish_and_clear();
    let result = result?;
    files::remove_previous(&a.out)?;
    let mut written = files::write_sizing(&case, &result, &a.out)?;
    // The chosen design's full results, plots and report (with the sizing) in the same directory:
    // its 3D run when the corners were checked, else its 2D run.
    let corner_run = result.corner.as_ref().and_then(|c| c.chosen_run.as_ref());
    if let Some((chosen, r3)) = corner_run {
        written.extend(files::write_run3(
            chosen,
            r3,
            &estimate::cross_check(chosen),
            &a.out,
            a.units.into(),
        )?);
        written.extend(frostline::batch::render(&a.out, false, a.image.dpi)?);
    } else if let Some((chosen, r)) = &result.chosen_run {
        written.extend(files::write_run(
            chosen,
            r,
            &estimate::cross_check(chosen),
            &a.out,
            a.units.into(),
        )?);
        written.extend(frostline::batch::render(&a.out, false, a.image.dpi)?);
    }
    written.push(files::write_manifest(&a.out, &written, false)?);
    say!(
        "{}",
        report::in_units(a.units.into(), || report::sizing::text(
            &files::SizingFile::new(&case, &result)
        ))
    );
    print_files(&a.out, &written);
    let mut u = Vec::new();
    if result.no_insulation_needed.is_none() && result.chosen.is_none() {
        u.push("no design within the bounds meets the frost margin".to_string());
    }
    if let Some(c) = result.corner.as_ref().filter(|c| c.check.chosen.is_none()) {
        u.push(format!("the 3D corner check: {}", c.check.note));
    }
    if let Some((c, r)) = &result.chosen_run {
        let s = files::Summary::new(c, r, &estimate::cross_check(c));
        u.extend(
            unmet(&s)
                .into_iter()
                .filter(|m| m.starts_with("the spin-up")),
        );
    }
    Ok(u)
}

fn soil(a: &SoilArgs) -> Result<String, Error> {
    use frostline::physics::library::{bundled_soil, SOILS};
    if a.list || a.name.is_none() {
        return Ok(text::soil_list());
    }
    let name = a.name.as_deref().unwrap_or("");
    let mut s = bundled_soil(name).ok_or_else(|| {
        let names: Vec<&str> = SOILS.iter().map(|(n, _)| *n).collect();
        Error::command_line(
            "NAME",
            InputKind::UnknownName,
            format!(
                "no soil \"{name}\" in the library; known: {}",
                names.join(", ")
            ),
        )
    })?;
    if a.dry_density.is_some() || a.water_content.is_some() || a.quartz.is_some() {
        let mut ix = s.index();
        if let Some(v) = a.dry_density {
            ix.dry_density = flag_range(v, (100.0, 2700.0), "--dry-density", "100 to 2700 kg/m³")?;
        }
        if let Some(v) = a.water_content {
            ix.water_content = flag_range(
                v,
                (0.0, 5.0),
                "--water-content",
                "0 to 5 (fraction of dry mass)",
            )?;
        }
        if let Some(v) = a.quartz {
            ix.quartz = flag_range(v, (0.0, 1.0), "--quartz", "0 to 1 (fraction)")?;
        }
        s = s.with_index(ix);
    }
    text::soil_text(name, &s, a.method.into()).ok_or_else(|| {
        Error::command_line("--method", InputKind::OutOfRange, "Kersten's fits need at least 7 % water (fine soils) or 1 % (coarse); allowed: --method johansen")
    })
}

fn climate(a: ClimateArgs) -> Result<(), Error> {
    use frostline::physics::climate::{read_series, summarize, ReadOptions};
    if !(a.return_period > 1.0 && a.return_period <= 10_000.0) {
        return Err(Error::command_line(
            "--return-period",
            InputKind::OutOfRange,
            format!(
                "{} is out of range; allowed: more than 1 and at most 10000 years",
                a.return_period
            ),
        ));
    }
    let opts = ReadOptions {
        max_gap_days: a.max_gap_days,
        ..Default::default()
    };
    let series = read_series(&a.series, &opts)?;
    let s = summarize(&series, a.return_period, a.fit.into())?;
    say!("{}", text::climate_text(&s));
    if let Some(dir) = a.out {
        files::create_dir(&dir)?;
        let p = files::write_json(&dir, "climate_summary.json", &s)?;
        sayln!("\n  wrote {}", p.display());
    }
    Ok(())
}

fn plot(a: PlotArgs) -> Result<(), Error> {
    let zoom = match a.zoom {
        None => None,
        Some(text) => {
            let v: Vec<f64> = text
                .split(',')
                .filter_map(|x| x.trim().parse().ok())
                .collect();
            let ok = v.len() == 4 && text.split(',').count() == 4 && v[1] > v[0] && v[3] > v[2];
            if !ok {
                return Err(Error::command_line("--zoom", InputKind::Syntax, format!("\"{text}\" is not a window; allowed: x0,x1,z0,z1 in m with x0 < x1 and z0 < z1")));
            }
            Some([v[0], v[1], v[2], v[3]])
        }
    };
    let opts = PlotOptions {
        day_of_year: a.day,
        zoom,
        animate: a.animate,
        out: a.out.clone(),
        dpi: a.image.dpi,
    };
    let out = a.out.as_deref().unwrap_or(&a.dir);
    let _lock = files::check_writable(out)?;
    // The run directory's files are checked before anything is drawn.
    files::read_case_copy(&a.dir, &files::read_summary(&a.dir)?)?;
    let mut written = frostline::plot::render_dir(&a.dir, &opts)?;
    written.push(report::html::write_report_to(&a.dir, out)?);
    written.push(files::write_manifest(out, &written, true)?);
    for f in written {
        sayln!("{}", f.display());
    }
    Ok(())
}

/// The shard of a run: `--shard K/N`, else the Slurm array task, else the whole design.
fn shard_of(flag: Option<&str>) -> Result<frostline::uncertainty::Shard, Error> {
    use frostline::uncertainty::Shard;
    let usage = |why: String| {
        Error::command_line(
            "--shard",
            InputKind::OutOfRange,
            format!("{why}; allowed: K/N with 1 ≤ K ≤ N"),
        )
    };
    if let Some(s) = flag {
        let (k, n) = s
            .split_once('/')
            .ok_or_else(|| usage(format!("\"{s}\" is not K/N")))?;
        let k: usize = k
            .trim()
            .parse()
            .map_err(|_| usage(format!("\"{k}\" is not a number")))?;
        let n: usize = n
            .trim()
            .parse()
            .map_err(|_| usage(format!("\"{n}\" is not a number")))?;
        if k == 0 || k > n {
            return Err(usage(format!("{k}/{n}")));
        }
        return Ok(Shard { index: k, count: n });
    }
    let env = |k: &str| {
        std::env::var(k)
            .ok()
            .and_then(|v| v.trim().parse::<usize>().ok())
    };
    match (env("SLURM_ARRAY_TASK_ID"), env("SLURM_ARRAY_TASK_COUNT")) {
        (Some(id), Some(n)) if n >= 1 => {
            // Task k (1-based) of an array min, min + step, …: k = (id − min)/step + 1.
            let slurm = |why: String| {
                Error::command_line(
                    "SLURM_ARRAY_TASK_ID",
                    InputKind::OutOfRange,
                    format!(
                        "{why}; give the shard with --shard K/N (--shard 1/1: the whole design)"
                    ),
                )
            };
            let min = env("SLURM_ARRAY_TASK_MIN").unwrap_or(0);
            let step = env("SLURM_ARRAY_TASK_STEP").unwrap_or(1).max(1);
            if id < min || (id - min) % step != 0 {
                return Err(slurm(format!(
                    "task {id} is not on the array {min}, {min} + {step}, …"
                )));
            }
            let k = (id - min) / step + 1;
            if k > n {
                return Err(slurm(format!("task {id} is beyond the array's {n} tasks")));
            }
            Ok(Shard { index: k, count: n })
        }
        _ => Ok(Shard::WHOLE),
    }
}

/// The shard of a split command, its output directory (OUT, or OUT/shard-K-of-N) locked for
/// writing, and the worker pool's size set.
fn split_start(
    s: &SplitArgs,
) -> Result<(frostline::uncertainty::Shard, PathBuf, std::fs::File), Error> {
    let shard = shard_of(s.shard.as_deref())?;
    if let Some(j) = s.jobs {
        let _ = rayon::ThreadPoolBuilder::new()
            .num_threads(j.max(1))
            .build_global();
    }
    let out = if shard.count > 1 {
        s.out
            .join(format!("shard-{}-of-{}", shard.index, shard.count))
    } else {
        s.out.clone()
    };
    let lock = files::check_writable(&out)?;
    Ok((shard, out, lock))
}

fn uncertainty(a: UncertaintyArgs) -> Result<Vec<String>, Error> {
    let start = std::time::Instant::now();
    let mut case: Case = load_case(&a.case)?;
    let Some(u) = case.uncertainty.as_mut() else {
        return Err(Error::in_file(
            &case.file,
            "uncertainty",
            InputKind::Missing,
            "the case has no [uncertainty] table; `frostline uncertainty` needs one",
        ));
    };
    if let Some(n) = a.samples {
        u.samples = flag_range(n, (2, 100_000), "--samples", "2 to 100000")?;
    }
    if let Some(s) = a.seed {
        u.seed = s;
    }
    if let Some(m) = a.split.mesh {
        case.simulation.mesh = m.into();
    }
    let (shard, out, _lock) = split_start(&a.split)?;
    let total = case
        .uncertainty
        .as_ref()
        .map_or(0, |u| (0..u.samples).filter(|&i| shard.has(i)).count());
    let bar = bar(a.split.quiet, None);
    bar.set_message(format!("0 of {total} samples"));
    let cb = |n: usize| bar.set_message(format!("{n} of {total} samples"));
    let samples = frostline::uncertainty::run_samples(&case, shard, &cb);
    bar.finish_and_clear();
    let samples = samples?;
    let mesh = format!("{:?}", case.simulation.mesh).to_lowercase();
    let mut f = files::uncertainty::new_file(
        &case,
        shard,
        &samples,
        (
            &mesh,
            start.elapsed().as_secs_f64(),
            rayon::current_num_threads(),
        ),
    )
    .ok_or_else(|| Error::Output("no [uncertainty] design".into()))?;
    f.units = a.units.into();
    write_uncertainty(&out, &f, &samples)?;
    Ok(uncertainty_unmet(&f.stats, shard.count == 1))
}

/// The criteria an uncertainty run or merge did not meet: no sample ran (for the whole design: a
/// shard may be empty by design), samples not periodic.
fn uncertainty_unmet(st: &frostline::uncertainty::Stats, whole: bool) -> Vec<String> {
    let mut unmet = Vec::new();
    if st.samples_run == 0 && whole {
        unmet.push("no sample ran: every sample was refused by the case rules or failed (samples.csv, refused_because)".into());
    }
    if st.samples_not_periodic > 0 {
        unmet.push(report::uncertainty::not_periodic(st));
    }
    unmet
}

/// The files of an uncertainty run or merge (samples, statistics, plots, report, manifest) and
/// the printed summary.
fn write_uncertainty(
    out: &Path,
    f: &files::uncertainty::UncertaintyFile,
    samples: &[frostline::uncertainty::SampleResult],
) -> Result<(), Error> {
    files::remove_previous(out)?;
    let mut written = files::uncertainty::write(out, f, samples)?;
    written.extend(frostline::plot::uncertainty_plots(out, f, samples)?);
    written.push(files::write_atomic(
        out,
        "report.html",
        report::uncertainty::html(out, f)?.as_bytes(),
    )?);
    written.push(files::write_manifest(out, &written, false)?);
    say!("{}", report::uncertainty::text(f));
    print_files(out, &written);
    Ok(())
}

fn batch(a: BatchArgs) -> Result<Vec<String>, Error> {
    use frostline::batch;
    let start = std::time::Instant::now();
    let list = batch::read_list(&a.list)?;
    let (shard, out, _lock) = split_start(&a.split)?;
    let mesh = a.split.mesh.map(Into::into);
    let opts = batch::RunInto {
        units: a.units.into(),
        plots: !a.no_plots,
        animate: false,
        dpi: None,
    };
    let total = (0..list.paths.len()).filter(|&i| shard.has(i)).count();
    let bar = bar(a.split.quiet, None);
    bar.set_message(format!("0 of {total} cases"));
    let cb = |n: usize| bar.set_message(format!("{n} of {total} cases"));
    let rows = batch::run_batch(&list, (shard, mesh), &out, &opts, &cb);
    bar.finish_and_clear();
    let rows = rows?;
    let mesh = mesh.map(|m: Fineness| format!("{m:?}").to_lowercase());
    let mut f = files::batch::BatchFile::new(
        &list.file,
        &list.entries,
        (mesh, shard),
        &rows,
        (start.elapsed().as_secs_f64(), rayon::current_num_threads()),
    );
    f.units = a.units.into();
    write_batch(&out, &f, &rows)
}

/// The files of a batch or its merge (batch.csv, batch.json, manifest), the printed table, and
/// the criteria not met (one line per case that did not run or did not meet one).
fn write_batch(
    out: &Path,
    f: &files::batch::BatchFile,
    rows: &[files::batch::CaseRow],
) -> Result<Vec<String>, Error> {
    let mut written = files::batch::write(out, f, rows)?;
    written.push(files::write_manifest(out, &written, false)?);
    say!("{}", report::batch::text(f, rows));
    print_files(out, &written);
    Ok(rows
        .iter()
        .filter(|r| r.status != "ok")
        .map(|r| format!("case {} ({}): {}", r.case, r.case_file, r.status))
        .collect())
}

/// Merge the shard directories of one batch: every shard once, the same list and mesh; the
/// cases' directories copied into OUT/cases.
fn merge_batch(a: &MergeArgs) -> Result<Vec<String>, Error> {
    let start = std::time::Instant::now();
    let parts: Vec<files::batch::BatchFile> = a
        .dirs
        .iter()
        .map(|d| files::batch::read_file(d))
        .collect::<Result<_, _>>()?;
    let first = &parts[0];
    let same: Vec<_> = parts
        .iter()
        .map(|p| (p.shard, p.cases == first.cases && p.mesh == first.mesh))
        .collect();
    let missing = check_shards(
        &a.dirs,
        &same,
        "another batch (case list, mesh or shard count); allowed: shards of one `frostline batch`",
    )?;
    let (mut rows, mut copies) = (Vec::new(), Vec::new());
    for d in &a.dirs {
        for r in files::batch::read_rows(d)? {
            // The directory a batch gives the case, nothing else (no path out of OUT).
            let entry = first.cases.get(r.case.wrapping_sub(1));
            if entry.map(|e| frostline::batch::case_dir(r.case - 1, Path::new(e)))
                != Some(r.dir.clone())
            {
                return Err(files::bad_file(
                    d,
                    "batch.csv",
                    format!("case {} with directory \"{}\"; allowed: the batch's own (cases/NNN-NAME of the listed case)", r.case, r.dir),
                ));
            }
            if r.error.is_none() {
                copies.push((d.join(&r.dir), a.out.join(&r.dir)));
            }
            rows.push(r);
        }
    }
    if !missing.is_empty() {
        return Err(Error::command_line(
            "merge",
            InputKind::Missing,
            format!(
                "shards {missing:?} of {} missing; allowed: every shard of the batch",
                first.shard.count
            ),
        ));
    }
    let _lock = files::check_writable(&a.out)?;
    // Only the cases that ran have results; an earlier run's files in OUT are cleared first.
    for (from, to) in &copies {
        files::clear_run(to)?;
        copy_dir(from, to)?;
    }
    for r in rows.iter().filter(|r| r.error.is_some()) {
        files::clear_run(&a.out.join(&r.dir))?;
    }
    let f = files::batch::BatchFile {
        shard: frostline::uncertainty::Shard::WHOLE,
        cases_run: parts.iter().map(|p| p.cases_run).sum(),
        cases_ok: parts.iter().map(|p| p.cases_ok).sum(),
        cases_not_run: parts.iter().map(|p| p.cases_not_run).sum(),
        wall_time_s: start.elapsed().as_secs_f64()
            + parts.iter().map(|p| p.wall_time_s).sum::<f64>(),
        threads: parts.iter().map(|p| p.threads).max().unwrap_or(1),
        units: a.units.map_or(first.units, Into::into),
        ..first.clone()
    };
    write_batch(&a.out, &f, &rows)
}

/// Copy directory `from` (files and subdirectories) to `to`.
fn copy_dir(from: &Path, to: &Path) -> Result<(), Error> {
    std::fs::create_dir_all(to).map_err(|e| Error::io(to, e))?;
    for entry in std::fs::read_dir(from).map_err(|e| Error::io(from, e))? {
        let entry = entry.map_err(|e| Error::io(from, e))?;
        let (src, dst) = (entry.path(), to.join(entry.file_name()));
        if src.is_dir() {
            copy_dir(&src, &dst)?;
        } else {
            std::fs::copy(&src, &dst).map_err(|e| Error::io(&src, e))?;
        }
    }
    Ok(())
}

/// Check the shards `parts` (each with whether it is of the same run as the first) read from
/// `dirs`: all of the same run and shard count (else the error `other`), none twice. Returns the
/// shards missing.
fn check_shards(
    dirs: &[PathBuf],
    parts: &[(frostline::uncertainty::Shard, bool)],
    other: &str,
) -> Result<Vec<usize>, Error> {
    let count = parts[0].0.count;
    let mut seen = Vec::new();
    for (d, (shard, same)) in dirs.iter().zip(parts) {
        if !same || shard.count != count {
            return Err(Error::command_line(
                "merge",
                InputKind::Conflict,
                format!("{}: {other} than {}", d.display(), dirs[0].display()),
            ));
        }
        if seen.contains(&shard.index) {
            return Err(Error::command_line(
                "merge",
                InputKind::Conflict,
                format!("{}: shard {} given twice", d.display(), shard.index),
            ));
        }
        seen.push(shard.index);
    }
    Ok((1..=count).filter(|k| !seen.contains(k)).collect())
}

fn merge(a: MergeArgs) -> Result<Vec<String>, Error> {
    if a.dirs[0].join("batch.json").is_file() {
        return merge_batch(&a);
    }
    let start = std::time::Instant::now();
    let parts: Vec<files::uncertainty::UncertaintyFile> = a
        .dirs
        .iter()
        .map(|d| files::uncertainty::read_file(d))
        .collect::<Result<_, _>>()?;
    let first = &parts[0];
    let same: Vec<_> = parts
        .iter()
        .map(|p| {
            let same =
                p.design == first.design && p.mesh == first.mesh && p.case_file == first.case_file;
            (p.shard, same)
        })
        .collect();
    let missing = check_shards(
        &a.dirs,
        &same,
        "another design (case file, samples, seed, inputs, mesh or shard count); allowed: shards of one `frostline uncertainty` design",
    )?;
    let mut samples = Vec::new();
    for (d, p) in a.dirs.iter().zip(&parts) {
        samples.extend(files::uncertainty::read_samples(d, &p.design.inputs)?);
    }
    let n = first.design.samples;
    samples.sort_by_key(|s| s.index);
    let complete = samples.len() == n && samples.iter().enumerate().all(|(i, s)| s.index == i);
    if !complete {
        return Err(Error::command_line("merge", InputKind::Missing, format!(
            "the shards hold {} of the design's {n} samples (missing shards: {missing:?}); allowed: every shard of the design",
            samples.len()
        )));
    }
    let f = files::uncertainty::UncertaintyFile {
        stats: frostline::uncertainty::Stats::of(&samples, &first.design.inputs),
        shard: frostline::uncertainty::Shard::WHOLE,
        median_sample_s: files::uncertainty::median_run_s(&samples),
        wall_time_s: start.elapsed().as_secs_f64()
            + parts.iter().map(|p| p.wall_time_s).sum::<f64>(),
        threads: parts.iter().map(|p| p.threads).max().unwrap_or(1),
        units: a.units.map_or(first.units, Into::into),
        ..first.clone()
    };
    let _lock = files::check_writable(&a.out)?;
    write_uncertainty(&a.out, &f, &samples)?;
    Ok(uncertainty_unmet(&f.stats, true))
}

/// List the files written in `dir`, by name.
fn print_files(dir: &Path, written: &[PathBuf]) {
    sayln!("\n  Files in {}:", dir.display());
    for f in written {
        sayln!(
            "    {}",
            f.file_name()
                .map(|s| s.to_string_lossy())
                .unwrap_or_default()
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn command_line_definition_is_consistent() {
        Cli::command().debug_assert();
        let c = Cli::try_parse_from([
            "frostline",
            "run",
            "case.toml",
            "--out",
            "o",
            "--mesh",
            "coarse",
        ])
        .unwrap();
        assert!(matches!(
            c.command,
            Command::Run(RunArgs {
                mesh: Some(MeshArg::Coarse),
                ..
            })
        ));
    }

    #[test]
    fn flag_ranges_name_the_flag() {
        let e = flag_range(0usize, (1, 100), "--max-spin-up-years", "1 to 100").unwrap_err();
        assert_eq!(
            e.to_string(),
            "command line: --max-spin-up-years: 0 is out of range; allowed: 1 to 100"
        );
    }
}
