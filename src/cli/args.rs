//! Raw command-line flags (clap). Checking and defaults live with each command.

use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

/// hone: how large is the discretisation error of a finite-element result, where does it sit,
/// and what should the next mesh look like.
#[derive(Debug, Parser)]
#[command(name = "hone", version, about, long_about = None)]
pub struct Cli {
    /// Print one JSON object on stdout instead of the text summary.
    #[arg(long, global = true)]
    pub json: bool,
    /// No progress display.
    #[arg(long, global = true)]
    pub quiet: bool,
    /// Flush every output file to the disk before it is renamed into place, so it survives a
    /// power cut right after the run (slower on big files). Without it outputs are still never
    /// left half-written by a failed run.
    #[arg(long, global = true)]
    pub sync: bool,
    /// Write every output through the operating system's file cache. By default, on Linux,
    /// files of 4 MB and more go straight to the disk, which is much faster on virtual machines
    /// and no slower on solid-state disks; the cache is faster on spinning disks.
    #[arg(long, global = true)]
    pub cached_writes: bool,
    /// Worker threads (default: all cores). Results are identical for any count.
    #[arg(long, global = true, value_name = "N")]
    pub threads: Option<usize>,
    /// The command.
    #[command(subcommand)]
    pub command: Command,
}

/// hone's commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// List what a results file holds: cell types and counts, arrays, bounding box, dimension.
    Inspect(InspectArgs),
    /// Recover stresses (SPR) and estimate the energy-norm discretisation error per element.
    Estimate(EstimateArgs),
    /// Estimate, then plan the next mesh: marks, target size field, predicted cost, singular spots.
    Plan(PlanArgs),
    /// Convergence study over results of the same part on successively finer meshes.
    Study(StudyArgs),
    /// Build, solve and estimate the shipped demo scenario (a deck plate with a hatch opening).
    Demo(DemoArgs),
}

/// `hone demo [DIR]`.
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// Folder for the result files (default: a new folder hone-demo in the current folder).
    pub dir: Option<PathBuf>,
}

/// `hone inspect FILE`.
#[derive(Debug, Args)]
pub struct InspectArgs {
    /// Results file (.vtu or .pvtu).
    pub file: PathBuf,
}

/// Material, analysis mode and input-array options shared by the commands that compute.
#[derive(Debug, Args, Clone, Default)]
pub struct ModelArgs {
    /// Young's modulus E (any consistent unit set).
    #[arg(long, value_name = "E")]
    pub youngs: Option<f64>,
    /// Poisson's ratio nu.
    #[arg(long, value_name = "NU")]
    pub poisson: Option<f64>,
    /// JSON file mapping zone ids to materials: {"1": {"youngs": E, "poisson": nu}, ...}.
    #[arg(long, value_name = "FILE", requires = "zone_array")]
    pub materials: Option<PathBuf>,
    /// Integer cell array holding each cell's zone id (used with --materials).
    #[arg(long, value_name = "NAME")]
    pub zone_array: Option<String>,
    /// 2D plane stress (give --thickness; default 1).
    #[arg(long, conflicts_with_all = ["plane_strain", "axisymmetric"])]
    pub plane_stress: bool,
    /// 2D plane strain, per unit thickness.
    #[arg(long, conflicts_with = "axisymmetric")]
    pub plane_strain: bool,
    /// 2D axisymmetric about the y axis (x = radius).
    #[arg(long)]
    pub axisymmetric: bool,
    /// Plane-stress thickness.
    #[arg(long, value_name = "T")]
    pub thickness: Option<f64>,
    /// Displacement point array (default: the first of displacement, displacements, disp, u).
    #[arg(long, value_name = "NAME")]
    pub displacement_array: Option<String>,
    /// Estimate on the supported cells and leave other cell types out.
    #[arg(long)]
    pub skip_unsupported: bool,
}

/// Stress recovery method.
#[derive(Copy, Clone, Debug, PartialEq, Eq, ValueEnum)]
pub enum RecoveryArg {
    /// Superconvergent patch recovery (Zienkiewicz-Zhu).
    Spr,
    /// Simple nodal averaging, for comparison.
    Average,
}

/// `hone estimate FILE`.
#[derive(Debug, Args)]
pub struct EstimateArgs {
    /// Results file (.vtu or .pvtu) with a displacement point array.
    pub file: PathBuf,
    /// Material and mode.
    #[command(flatten)]
    pub model: ModelArgs,
    /// Stress recovery method.
    #[arg(long, value_enum, default_value = "spr")]
    pub recovery: RecoveryArg,
    /// Write an annotated VTU with the recovered stresses and error fields.
    #[arg(long, value_name = "PATH")]
    pub out: Option<PathBuf>,
    /// Write the annotated VTU as ascii (for inspection) instead of appended raw binary.
    #[arg(long, requires = "out")]
    pub ascii: bool,
    /// How many of the largest element errors to list.
    #[arg(long, default_value_t = 10, value_name = "N")]
    pub top: usize,
}

/// `hone plan FILE`.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Results file (.vtu, .pvtu or .msh) with a displacement point array.
    pub file: PathBuf,
    /// Material and mode.
    #[command(flatten)]
    pub model: ModelArgs,
    /// Stress recovery method.
    #[arg(long, value_enum, default_value = "spr")]
    pub recovery: RecoveryArg,
    /// Global relative error to aim for, in percent of the energy norm (default 5).
    #[arg(long, value_name = "PERCENT")]
    pub target_error: Option<f64>,
    /// Largest number of DOFs the next mesh may have.
    #[arg(long, value_name = "N")]
    pub max_dofs: Option<f64>,
    /// optimal (fewest elements for the goal), or a marking strategy that halves the size of
    /// the marked elements: dorfler THETA, maximum THETA, fraction F.
    #[arg(long, num_args = 1..=2, value_names = ["NAME", "VALUE"], default_value = "optimal")]
    pub strategy: Vec<String>,
    /// Never plan a size above the current one.
    #[arg(long)]
    pub refine_only: bool,
    /// Smallest target size anywhere.
    #[arg(long, value_name = "H")]
    pub size_min: Option<f64>,
    /// Largest target size anywhere.
    #[arg(long, value_name = "H")]
    pub size_max: Option<f64>,
    /// Size gradation: sizes grow by at most G per unit length between nodes (default 0.3).
    #[arg(long, value_name = "G")]
    pub grading: Option<f64>,
    /// One plan refines an element at most this many times (default 8).
    #[arg(long, value_name = "FACTOR")]
    pub max_refine_factor: Option<f64>,
    /// One plan coarsens an element at most this many times (default 4).
    #[arg(long, value_name = "FACTOR")]
    pub max_coarsen_factor: Option<f64>,
    /// Smallest size at a singular spot (default 1e-4 of the bounding-box diagonal).
    #[arg(long, value_name = "H")]
    pub singular_floor: Option<f64>,
    /// A singular point the screening cannot see (a point load or point support, say), as
    /// X,Y or X,Y,Z; repeat for more points.
    #[arg(long, value_name = "X,Y[,Z]")]
    pub singular: Vec<String>,
    /// Folder for the plan files (default: next to the input, named after it with ".plan").
    #[arg(long, value_name = "DIR")]
    pub out_dir: Option<PathBuf>,
}

/// `hone study FILE FILE [FILE...]`.
#[derive(Debug, Args)]
pub struct StudyArgs {
    /// Results files of the same part on successively finer meshes, in any order (sorted by
    /// degrees of freedom).
    #[arg(required = true, num_args = 2.., value_name = "FILE")]
    pub files: Vec<PathBuf>,
    /// Material and mode (the same for every mesh).
    #[command(flatten)]
    pub model: ModelArgs,
    /// A value to follow besides strain energy, estimated error and peak von Mises (repeat
    /// for more). Syntax: [max:|min:|mean:]FIELD@PLACE with FIELD one of ux uy uz sxx syy szz
    /// sxy syz sxz von_mises and PLACE a point x,y\[,z\], box(x0,y0,x1,y1) or
    /// box(x0,y0,z0,x1,y1,z1), sphere(x,y,r) or sphere(x,y,z,r). Points interpolate in the
    /// element holding them; regions reduce the nodes inside (max by default, mean weighted by
    /// volume). Examples: "ux@10,20", "max:von_mises@box(0,0,5,5)", "mean:syy@sphere(3,4,0.5)".
    #[arg(long = "probe", value_name = "PROBE")]
    pub probes: Vec<String>,
    /// Relative change between the finest two meshes below which a value counts as converged,
    /// in percent.
    #[arg(long, default_value_t = 1.0, value_name = "PERCENT")]
    pub tolerance: f64,
    /// SVG plot of the changes and of the estimated error against DOFs (default: study.svg
    /// next to the first input).
    #[arg(long, value_name = "FILE.svg")]
    pub plot: Option<PathBuf>,
    /// Write no plot.
    #[arg(long, conflicts_with = "plot")]
    pub no_plot: bool,
}
