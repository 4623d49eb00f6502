/* Help texts: `slowscan help [COMMAND]` and `COMMAND --help`. */
#include "cli.h"
#include "modes_cli.h"

#include <string.h>

static const char overview[] =
    "slowscan — screen time series for critical slowing down ahead of a tipping point\n"
    "\n"
    "usage: slowscan COMMAND [options] FILE...\n"
    "\n"
    "commands:\n"
    "  screen      the main job: indicators and their trends, surrogate p, FDR q, flags\n"
    "  indicators  rolling-window indicators per series (series,time,indicator,value)\n"
    "  detrend     trend and residual per series (series,time,value,trend,residual)\n"
    "  robustness  the trend test over a grid of detrending x windows x bandwidths\n"
    "  recovery    recovery-rate path of an AR(1) with a drifting coefficient\n"
    "  timescales  relaxation modes of a step-forced response, its extrapolated equilibrium\n"
    "  emulate     linear-response emulation of another forcing, and where a run departs\n"
    "  surrogates  null-model replicates of each residual (series,replicate,time,value)\n"
    "  feedback    sliding regression of a forced run's flux on its response (lambda, T_eq)\n"
    "  merge       one run's summary from the summaries of its parts (q-values over all)\n"
    "  demo        write the invented demo data sets (lake stations, a coastal shelf grid)\n"
    "  help        this text, or 'slowscan help COMMAND'\n"
    "\n"
    "FILE is a CSV with a header row (comma, semicolon or tab; '#' lines are comments), or\n"
    "- for standard input. Its time column holds numbers or dates; monthly and yearly\n"
    "dated records are analysed on a month or year index, and outputs print dates.\n"
    "Each option is given once: a second --window (or -o and --output, --progress and\n"
    "--no-progress) is refused, never silently replaced. A list is one value, A,B,...,\n"
    "with no empty item.\n"
    "'slowscan --version' prints the version.\n";

static const char input_options[] =
    "input:\n"
    "  --time NAME          time column (default: the first column)\n"
    "  --vars A,B,...       series to analyse (default: every other column)\n"
    "  --from T, --until T  analyse only times within [T_from, T_until] (numbers, dates\n"
    "                       such as 1958-03-29 for a dated time column, ages with --age)\n"
    "  --calendar NAME      calendar of dated times: standard (default), proleptic_gregorian,\n"
    "                       noleap, all_leap, 360_day, julian\n"
    "  --time-format FMT    dates written otherwise than ISO 8601, e.g. %Y%m%d\n"
    "  --time-units U       a numeric time column in CF units, e.g. 'days since 1850-01-01'\n"
    "  --age                the time column counts back (ages before present), either order\n"
    "  --missing V,...      values that stand for missing data (e.g. -999,9.96921e36)\n"
    "  --resample STEP      interpolate linearly onto a regular grid of step STEP (not finer\n"
    "                       than the data's median step; nothing across gaps longer than\n"
    "                       --max-gap N median steps, default 2). Without it, rows missing\n"
    "                       from a regular grid are read as missing values, and an\n"
    "                       irregular grid is an error\n"
    "  --log                analyse the natural logarithm of the values (values must be > 0)\n"
    "detrending:\n"
    "  --detrend METHOD     gaussian-linear (default: Gaussian-kernel local-linear fit),\n"
    "                       gaussian (local-constant, Nadaraya-Watson), moving, loess,\n"
    "                       linear, poly:K, difference, none\n"
    "  --bandwidth LEN      kernel bandwidth / span of gaussian-linear, gaussian, moving and\n"
    "                       loess (default 10%)\n"
    "  --deseason PERIOD    remove a seasonal cycle of this period (time units) first: the\n"
    "                       mean cycle when PERIOD is a whole number of time steps, else\n"
    "                       3 sine/cosine harmonics fitted by least squares\n"
    "  --harmonics K        fit K harmonics of PERIOD instead (K >= 1, 2K below PERIOD/dt)\n"
    "  --deseason-window LEN  estimate the cycle in a centred moving window of LEN (at\n"
    "                       least two periods; shifted inward at the ends) so that a cycle\n"
    "                       whose amplitude changes is followed (default: the whole record)\n"
    "output:\n"
    "  -o FILE              output file (default: standard output); written atomically\n"
    "  --progress, --no-progress   progress on stderr: series done/total, series per second,\n"
    "                       time left, and the surrogates drawn of a series still running;\n"
    "                       one line rewritten in place on a terminal, else a line every 2 s\n"
    "                       (default: on when stderr is a terminal)\n"
    "  --quiet              no warnings on stderr (errors are still printed)\n"
    "\n"
    "LEN is N% of the analysed span, a number of time units, or for dated times a length\n"
    "in calendar units: 30y, 6mon, 10d (the calendar's mean year; a month is a twelfth).\n";

static const char rolling_options[] =
    "indicators:\n"
    "  --window LEN         trailing window (default 50%); W = round(LEN/dt)+1 samples\n"
    "  --indicators LIST    variance, sd, cv, skewness, kurtosis, lag1, ar1, recovery,\n"
    "                       redness, spectral_exponent, dfa (default variance,lag1; screen\n"
    "                       and robustness also recovery_trend, the drifting-AR(1) test)\n"
    "  --min-coverage F     windows with fewer than F*W samples present give NA (default 0.8)\n"
    "  --recovery log|increments  recovery rate as ln(ar1)/dt (default) or the slope of\n"
    "                       x[t+1]-x[t] on x[t] divided by dt\n"
    "  --step K             evaluate every K-th window, counted back from the last (K >= 1);\n"
    "                       default: every window for the moment indicators, and for redness,\n"
    "                       spectral_exponent and dfa the smallest step leaving at most 500\n"
    "                       windows; only evaluated windows are written and tested\n"
    "  --band LO:HI         spectral_exponent: fit only frequencies in [LO, HI] cycles per\n"
    "                       time unit, inside (0, 1/(2 dt)] (default: all positive ones)\n"
    "redness: power in the lowest fifth of the window's frequencies over the highest fifth;\n"
    "spectral_exponent: minus the slope of log power on log frequency; both from the Hann-\n"
    "tapered periodogram of the demeaned window. dfa: detrended-fluctuation exponent, box\n"
    "sizes 4 .. W/4 (W >= 32). These three are NA in a window with any missing sample.\n";

static const char cautions[] =
    "cautions:\n"
    "  Slowing-down indicators are evidence, not forecasts. They can miss transitions driven\n"
    "  by noise or by the rate of forcing, they can rise for reasons other than an approaching\n"
    "  threshold, and they give no date. A p-value depends on the null model chosen.\n"
    "  Decisions with consequences for people belong to the responsible experts and\n"
    "  authorities; treat this output as one input to their judgement.\n";

static const char testing_options[] =
    "significance:\n"
    "  --surrogates M       surrogate replicates (screen: 1000, robustness: 0 = tau only);\n"
    "                       screen also 'auto' with --budget N, --max-per-series K,\n"
    "                       --risk E and --risk-joint\n"
    "  --null MODEL         null model for the surrogates of the residual:\n"
    "                       phase (default): Fourier phases randomised, periodogram kept;\n"
    "                       aaft: amplitude-adjusted, the set of values kept;\n"
    "                       iaaft: iterated aaft, values kept, periodogram iterated;\n"
    "                       ar1: the fitted AR(1), simulated; block: moving-block bootstrap;\n"
    "                       control: phase surrogates of the control run's series of the\n"
    "                       same name (--control FILE), cut to the analysed length\n"
    "  --control FILE       the control run for --null control (read like the inputs, not\n"
    "                       cut by --from/--until, same time step)\n"
    "  --iaaft-tol T        iaaft stops when its spectral error improves by less than\n"
    "                       this fraction (default 1e-4); --iaaft-iterations K caps it (200)\n"
    "  --block-length L     block length in samples (default round(n^(1/3)), the order\n"
    "                       Hall, Horowitz & Jing 1995 give for variance-type statistics)\n"
    "  --alternative increasing|decreasing|two-sided  override each indicator's default\n"
    "  --seed S             random seed (default 1); same seed, same numbers\n"
    "  --threads N          threads for the surrogates (default: the cores it may use); the\n"
    "                       output is identical for any N\n";

static const char figure_options[] =
    "figures:\n"
    "  --figures DIR        also draw figures into DIR (made if missing; its parent must\n"
    "                       exist), one file per series, written whole or not at all\n"
    "  --figure-format png|svg|pdf  file format of the figures (default png; only with\n"
    "                       --figures)\n";

static void help_detrend(FILE *out)
{
    fputs("usage: slowscan detrend [options] FILE...\n\n"
          "Writes the trend and residual of every series as CSV\n"
          "series,time,value,trend,residual (value is the series as detrended: after\n"
          "--log, --resample and --deseason).\n\n", out);
    fputs(input_options, out);
}

static void help_indicators(FILE *out)
{
    fputs("usage: slowscan indicators [options] FILE...\n\n"
          "Detrends every series and writes its rolling-window indicators as CSV\n"
          "series,time,indicator,value; each value uses the trailing window ending at time.\n\n",
          out);
    fputs(input_options, out);
    fputs(rolling_options, out);
}

static const char ensemble_options[] =
    "ensembles (grouped within each input, one process; not with --resume, --maps or\n"
    "--figures):\n"
    "  --ensemble           columns NAME.MEMBER (split at the last '.') are the members of\n"
    "                       ensemble NAME, at least 4 each; every dotted name must then\n"
    "                       belong to one (an ensemble of fewer members, or members that\n"
    "                       stop at different times, is refused); names without '.' stay\n"
    "                       plain series. Opt-in, so dotted names are never grouped by\n"
    "                       accident. In a NetCDF input the members lie along a dimension\n"
    "                       named member, realization, ensemble or ens, or whose\n"
    "                       coordinate has standard_name realization (CF): the cells\n"
    "                       VAR[DIM=M,...] of each place form an ensemble VAR[...]; such a\n"
    "                       file is read whole, not a part at a time\n"
    "  --members A,B,C,...  only the columns NAME.A, NAME.B, ... are members (at least 4\n"
    "                       listed; each ensemble must have all of them); implies\n"
    "                       --ensemble\n"
    "  --member-anomalies   screen each member minus the ensemble mean (the forced\n"
    "                       response removed: what an indicator of internal variability\n"
    "                       needs); implies --ensemble. The mean's rows screen the mean\n"
    "                       of the members as read.\n"
    "                       The summary gains columns role,share_flagged (role: member,\n"
    "                       series (not in an ensemble), mean, pooled) and rows after the\n"
    "                       members': NAME[mean], the ensemble mean (missing where any member\n"
    "                       is), screened like a series; NAME[pooled], per ensemble x test the\n"
    "                       members' mean statistic against the mean of their surrogates'\n"
    "                       (replicate j pooled over the members), p = (1 + #{pooled_j >=\n"
    "                       pooled}) / (M + 1), with share_flagged, the share of members\n"
    "                       flagged rising or falling. Benjamini-Hochberg: the run's q-values\n"
    "                       are over the members' (and plain series') tests only; the means'\n"
    "                       rows are a family of their own, the pooled rows another, each\n"
    "                       flagged at --fdr within its family. Size of the pooled test at\n"
    "                       a nominal 5% (1000 ensembles of 5 members that do not slow\n"
    "                       down: forced relaxation plus AR(1) noise, 150 samples, M = 99,\n"
    "                       Wilson 95% intervals): variance 5.2% [4.0, 6.8], lag1 5.7%\n"
    "                       [4.4, 7.3], recovery_trend 3.2% [2.3, 4.5]. Its power on 200\n"
    "                       ensembles of 5 members approaching a fold (300 samples):\n"
    "                       lag1 99%, variance and recovery_trend 100%, where single\n"
    "                       members reach 45%, 64% and 82%.\n"
    "                       Split warning (stderr, and 'ensembles' in --json): the members'\n"
    "                       final values (mean of each member's last 10% of the record)\n"
    "                       have a bimodality coefficient above 5/9 (Pfister et al. 2013), or\n"
    "                       the widest gap between them that leaves 2 or more members on\n"
    "                       each side is more than 4 times the pooled standard deviation\n"
    "                       within the two sides: the ensemble mean may follow a path no\n"
    "                       member follows. False warnings measured on ensembles that do not\n"
    "                       split (forced relaxation plus AR(1) noise, 200 samples, 10000\n"
    "                       ensembles each, Wilson 95% intervals): 4 members 10.2% [9.6,\n"
    "                       10.8], 6 members 6.2% [5.7, 6.7], 10 members 1.7% [1.5, 2.0],\n"
    "                       20 members 0.8% [0.6, 1.0], 40 members 0.1% [0.05, 0.2]; a\n"
    "                       split of half the members is found in 94-100% of ensembles\n";

static void help_screen(FILE *out)
{
    fputs("usage: slowscan screen [options] FILE...\n\n"
          "For every series: detrend, compute rolling indicators, and measure their trend by\n"
          "Kendall tau-b against time; with recovery_trend (default) also fit\n"
          "x[t+1] = (a0 + a1 s_t) x[t] + c + e (s_t: time rescaled to [-1/2, 1/2]) and take the\n"
          "t-value of a1, with a heteroscedasticity-consistent (HC3) standard error so that a\n"
          "noise whose spread follows the level or grows is not read as growing memory. Each\n"
          "statistic is tested against surrogates of the residual pushed through the same\n"
          "pipeline. Writes one row per series x test:\n"
          "series,indicator,n,window,bandwidth,tau,statistic,p_value,q_value,null,surrogates,flag\n"
          "(window and bandwidth in time units; statistic = tau, or t(a1) for recovery_trend,\n"
          "whose tau and window are NA). p = (1 + #{s_j >= s}) / (M + 1), one-sided toward a\n"
          "rise (two-sided on |tau| for skewness); q is the Benjamini-Hochberg adjusted p over\n"
          "every test of the run. flag: 'rising' when q <= --fdr and the statistic is > 0\n"
          "(p decides when there is a single test), 'falling' likewise for tau < 0 under a\n"
          "decreasing or two-sided alternative, 'none' otherwise, 'untested' with\n"
          "--surrogates 0, 'insufficient' when too few finite values remain (reason on stderr).\n\n"
          "Many tests: --surrogates auto draws surrogates in rounds (64 per series, then\n"
          "doubling) and stops a test once its side of the Benjamini-Hochberg threshold is\n"
          "settled: BH on the upper and on the lower limits of Clopper-Pearson intervals of\n"
          "every test's Monte Carlo p says which tests are rejected or accepted whatever their\n"
          "exact p; the others get more. --budget N caps the surrogates of the whole run\n"
          "(default 200 per test; when short, every request is cut to one common cap),\n"
          "--max-per-series K those of one series (default 100000; a test that reaches K is\n"
          "the fixed-K test: settled on the p --surrogates K gives, never undecided; so\n"
          "--max-per-series M gives the decisions of --surrogates M with less work; when\n"
          "1/(K+1) > q/m a discovery needs ties at that floor, and it says so).\n"
          "--risk E (default 0.01) is per test, spent\n"
          "over its draws (half in proportion to them, half evenly over the doublings): its\n"
          "intervals over all its rounds hold its exact p except with probability E, so\n"
          "about E x the tests may be classified otherwise than BH on the exact p would (a\n"
          "bound on the expected count, not a joint guarantee); --risk-joint spends E over all\n"
          "tests instead (every decision right with probability 1 - E, at many times the\n"
          "surrogates). When the budget is spent, open tests take the side of BH's threshold\n"
          "on the reported p that their interval lies on; the rest are 'undecided'.\n"
          "The summary then adds p_low,p_high (the 95% Clopper-Pearson interval of the Monte\n"
          "Carlo p), surrogates is what the test's series drew, p = (1 + hits) / (1 + drawn),\n"
          "and flag 'undecided' marks a test whose side the budget could not settle (the\n"
          "count is said on stderr). Replicate j is the draw --surrogates M makes as its j-th.\n"
          "With --resume each finished round is journaled and taken back on a restart;\n"
          "under mpirun each process draws its own series' rounds and the counts are summed\n"
          "after each round: the outputs are those of one uninterrupted serial run. Not yet\n"
          "with --ensemble.\n\n"
          "Trend leakage: a residual whose mean over the first or the last bandwidth is away\n"
          "from zero (level 0.01, standard error from the effective sample size) still holds\n"
          "part of the trend, and a rise near the ends may be the trend's; such series are\n"
          "named on stderr (one summary line when there are many) and marked in --json.\n"
          "What each null can hold: every null model keeps the residual's own memory only as\n"
          "far as it is built to; --null ar1 cannot reproduce memory that is not AR(1)\n"
          "(ARMA, 1/f noise), so its size there is not controlled (measured from 2% to 15%\n"
          "at a nominal 5%, depending on the memory); phase, aaft and iaaft keep the whole\n"
          "periodogram.\n"
          "Power, at equal 5% size against a matched null (the same mean path, constant\n"
          "memory; make bench): on fold approaches of 1000 samples recovery_trend 0.60,\n"
          "variance 0.43, lag1 0.41; of 3000 samples 0.99, 0.89, 0.82; of 300, about 0.2 each.\n\n",
          out);
    fputs(input_options, out);
    fputs(rolling_options, out);
    fputs(testing_options, out);
    fputs("screening:\n"
          "  --fdr Q              false-discovery rate for the flag (default 0.05)\n"
          "  --noise-trend        recovery_trend: let the innovation variance drift linearly\n"
          "                       too (weighted least squares; the HC3 error keeps the test\n"
          "                       valid when the noise sd, not the variance, rises linearly)\n"
          "  --rolling FILE       also write the rolling indicators (as 'indicators' does)\n"
          "  --json FILE          also write the summary as JSON, with the quantiles of each\n"
          "                       null distribution and every parameter of the run\n"
          "  --maps FILE.nc       for a NetCDF grid (exactly one among the inputs): per\n"
          "                       variable and test, maps of the statistic (tau; t for\n"
          "                       recovery_trend), p, q and the flag on the grid's other\n"
          "                       dimensions, coordinates copied, CF attributes; cells not\n"
          "                       analysed (all missing) are _FillValue\n"
          "  --format csv|table   summary as CSV (default) or as an aligned table\n"
          "  --resume             journal each finished series beside the summary\n"
          "                       (-o FILE gives FILE.journal); run the same command again\n"
          "                       after a kill and the journaled series are taken back, the\n"
          "                       rest computed: the outputs of an uninterrupted run. The\n"
          "                       journal is removed once the outputs are in place\n", out);
    fputs(cli_tail_help, out);
    fputs(ensemble_options, out);
    fputs(figure_options, out);
    fputs("                       screen-SERIES: the record and its trend (first window\n"
          "                       shaded), the indicators standardised on one panel, and a\n"
          "                       line per test: the surrogate null as 5-95% and 1-99%\n"
          "                       intervals, the observed statistic as a dot, p, q, verdict;\n"
          "                       screen-overview (two or more series): statistic against\n"
          "                       -log10(q) per test, flagged series named where they fit\n"
          "                       (the strongest 20 first), the rest counted;\n"
          "                       map-VAR (with --maps): per test the statistic of each\n"
          "                       grid cell over the two horizontal dimensions, flagged\n"
          "                       cells framed\n\n", out);
    fputs(cautions, out);
}

static void help_robustness(FILE *out)
{
    fputs("usage: slowscan robustness [options] FILE...\n\n"
          "Repeats the trend test of 'screen' over a grid of detrending methods x windows x\n"
          "bandwidths and writes series,indicator,detrend,window,bandwidth,tau,statistic,p_value\n"
          "(window and bandwidth in time units; p_value NA unless --surrogates M is given).\n"
          "Each method and bandwidth detrends once; its residual serves every window. A method\n"
          "without a bandwidth (linear, poly:K, difference, none) is run once per window, its\n"
          "bandwidth NA. recovery_trend in --indicators (the drifting-AR(1) test of screen) has\n"
          "no window: one row per method and bandwidth, window and tau NA, statistic t(a1).\n\n",
          out);
    fputs(input_options, out);
    fputs(rolling_options, out);
    fputs("grid:\n"
          "  --detrends LIST      detrending methods, comma-separated, each as --detrend takes\n"
          "                       it (e.g. gaussian,loess,linear,poly:2; default: the one\n"
          "                       --detrend); --detrend names the run's own choice in figures\n"
          "  --windows LIST       windows as A:B:STEP or A,B,C (default 30%:70%:10%)\n"
          "  --bandwidths LIST    bandwidths likewise (default 5%,7%,10%,14%,20%); ignored by\n"
          "                       detrending methods without a bandwidth\n"
          "  --fractions FILE     per series x indicator x method: cells, share with statistic\n"
          "                       > 0, share with p <= 0.05; with several methods also a row\n"
          "                       'all' over every cell (series,indicator,detrend,cells,\n"
          "                       share_statistic_positive,share_p_at_most_0.05)\n"
          "  --noise-trend        recovery_trend: let the innovation variance drift linearly\n", out);
    fputs(figure_options, out);
    fputs("                       robustness-SERIES: a panel per method x indicator (tau\n"
          "                       against the window, a line per bandwidth) and per method for\n"
          "                       recovery_trend (t(a1) against the bandwidth); filled points\n"
          "                       p <= 0.05, the --detrend/--window/--bandwidth choice ringed\n", out);
    fputs(testing_options, out);
    fputs("\n", out);
    fputs(cautions, out);
}

static const char projection_caution[] =
    "A projected crossing extrapolates a straight-line trend of the AR(1) coefficient beyond\n"
    "the record. It is not a forecast: a slow mode the record is too short to resolve, a\n"
    "trend that bends (near a fold the recovery rate nears zero like a square root, not a line),\n"
    "a transition set off early by noise or by the rate of forcing, or one that comes late,\n"
    "all make it wrong, and its interval only covers the noise of the fit, not these: it\n"
    "is a 95% interval only if the coefficient's trend really is a straight line (on\n"
    "AR(1) series whose coefficient drifts in a straight line it held the true crossing\n"
    "in 97 of 100; on 40 series driven toward a fold, in none: every projection fell late,\n"
    "by a median of 0.38 record lengths).\n\n";

static void help_recovery(FILE *out)
{
    fputs("usage: slowscan recovery [options] FILE...\n\n"
          "Fits x[t+1] = (a0 + a1 s_t) x[t] + c + e_t to each residual by least squares (s_t the\n"
          "time rescaled to [-1/2, 1/2]) and writes the recovery-rate path\n"
          "series,time,lambda,lambda_lo,lambda_hi, lambda = ln(a0 + a1 s_t)/dt with a pointwise\n"
          "95% band (delta method). a1 > 0: the memory grows, lambda rises toward 0.\n\n", out);
    fputs(input_options, out);
    fputs("  --json FILE          per series a0, a1, c, their HC3 standard errors, the t-value\n"
          "                       of a1, the model-based (OLS/WLS) error and t beside them,\n"
          "                       and, with --surrogates M, its surrogate p-value (a1 > 0)\n"
          "  --noise-trend        let the innovation variance drift linearly too (weighted\n"
          "                       least squares), so a growing noise is not read as memory\n"
          "  --project FILE       where the fitted path reaches lambda = 0 within twice the\n"
          "                       record, the crossing time with a 95% residual-bootstrap\n"
          "                       interval: series,status,crossing_time,crossing_lo,\n"
          "                       crossing_hi,interval,share_crossing,draws,basis (status\n"
          "                       ahead, within_record or none_within_2x_record; interval\n"
          "                       open_above when over 2.5% of draws do not cross)\n"
          "  --project-draws N    bootstrap draws (default 1000, at least 500)\n", out);
    fputs(figure_options, out);
    fputs("                       recovery-SERIES: lambda(t), its 95% band and the zero line\n", out);
    fputs(testing_options, out);
    fputs("\n", out);
    fputs(projection_caution, out);
    fputs(cautions, out);
}

static void help_surrogates(FILE *out)
{
    fputs("usage: slowscan surrogates [options] FILE...\n\n"
          "Detrends every series and writes surrogates of its residual as CSV\n"
          "series,replicate,time,value (replicates numbered from 1). With the same --seed these\n"
          "are exactly the surrogates 'screen' tests against.\n\n", out);
    fputs(input_options, out);
    fputs("surrogates:\n"
          "  --surrogates M       replicates per series (default 10)\n"
          "  --null MODEL         null model for the surrogates of the residual:\n"
          "                       phase (default): Fourier phases randomised, periodogram kept;\n"
          "                       aaft: amplitude-adjusted, the set of values kept;\n"
          "                       iaaft: iterated aaft, values kept, periodogram iterated;\n"
          "                       ar1: the fitted AR(1), simulated; block: moving-block bootstrap\n"
          "  --iaaft-tol T        iaaft stops when its spectral error improves by less than\n"
          "                       this fraction (default 1e-4); --iaaft-iterations K caps it (200)\n"
          "  --block-length L     block length in samples (default round(n^(1/3)), the order\n"
          "                       Hall, Horowitz & Jing 1995 give for variance-type statistics)\n"
          "  --seed S             random seed (default 1)\n", out);
}

static void help_demo(FILE *out)
{
    fputs("usage: slowscan demo [--out DIR] [--seed S]\n\n"
          "Writes DIR/stations.csv (default DIR: data): weekly turbidity at eight invented lake\n"
          "stations, four of which drift toward a fold, and DIR/shelf.nc: 50 years of monthly\n"
          "water clarity on an invented 8 x 10 coastal shelf grid (CF NetCDF, noleap, packed),\n"
          "a bay of which drifts toward a fold; see data/README.md.\n", out);
}

static void help_merge(FILE *out)
{
    fputs("usage: slowscan merge [--fdr Q] [-o FILE] SUMMARY...\n\n"
          "A field screened in parts (several jobs, each a share of the series, all with the\n"
          "same options) as one run: the rows of the parts' summaries in the order given, the\n"
          "q-values recomputed by Benjamini-Hochberg over every test of all parts and the\n"
          "flags decided again with --fdr (default 0.05). A part's own q-values are not the\n"
          "run's: the false discovery rate holds over all the tests only after the merge.\n"
          "The parts must have the same columns (a file column when a part had several\n"
          "inputs); every other field is kept as written.\n", out);
}

int cli_help(const char *topic, FILE *out)
{
    static const struct {
        const char *name;
        void (*print)(FILE *);
    } topics[] = {{"detrend", help_detrend},
                  {"indicators", help_indicators},
                  {"screen", help_screen},
                  {"surrogates", help_surrogates},
                  {"robustness", help_robustness},
                  {"recovery", help_recovery},
                  {"demo", help_demo},
                  {"merge", help_merge},
                  {"feedback", cli_help_feedback},
                  {"timescales", cli_help_timescales},
                  {"emulate", cli_help_emulate}};
    if (!topic) {
        fputs(overview, out);
        fputc('\n', out);
        fputs(cautions, out);
        return EXIT_OK;
    }
    for (size_t i = 0; i < sizeof topics / sizeof topics[0]; i++)
        if (strcmp(topic, topics[i].name) == 0) {
            topics[i].print(out);
            return EXIT_OK;
        }
    fprintf(stderr, "slowscan: no help for '%s' (commands: screen, robustness, recovery, feedback, timescales, emulate, indicators, detrend, surrogates, demo)\n", topic);
    return EXIT_BAD_INPUT;
}
