/* Help texts of timescales and emulate (listed in help.c's topics). */
#include "modes_cli.h"

/* Measured by suite emulate (tests/test_emulate.c) with EMULATE_RUNS=500 and 300. */
static const char EMULATE_RATE_TEXT[] =
    "Measured false departures (pairs of linear runs of a two-mode system: a step run of 150\n"
    "samples, its modes fitted, and a ramp run; band from the step run's residuals): with the\n"
    "default persistence 0 of 500 for white noise, 0 of 500 for AR(1) noise of r1 = 0.5 and\n"
    "0.8, 1 of 500 for skewed (exponential) white noise: under 1.1% in every case (Wilson 95%\n"
    "upper bound). A single sample outside the 99% band is no evidence: at --persist 1 the\n"
    "same runs departed 75-99% of the time; at --persist 2, 1% (white), 15% (r1 = 0.5), 52%\n"
    "(r1 = 0.8), 11% (skewed). Emulating beyond the step run (a ramp twice as long, to twice\n"
    "the step's forcing) raises the default's rate to 1 of 300 (white) and 5 of 300\n"
    "(r1 = 0.5; Wilson 95% 0.7-3.8%): the fitted modes' own error grows with extrapolation.\n\n";

static const char modes_input[] =
    "input:\n"
    "  --time NAME          time column (default: the first column)\n"
    "  --from T, --until T  use only times within [T_from, T_until]\n"
    "  --calendar, --time-format, --time-units, --missing, --resample STEP  as for screen\n";

static const char modes_cautions[] =
    "cautions:\n"
    "  An equilibrium extrapolated from fitted modes is a property of the fit, not a forecast:\n"
    "  a mode slower than the run is not pinned down by it (the 'unresolved' flag), and\n"
    "  feedbacks that change as the system warms are not in the model. Linear response is an\n"
    "  assumption the emulation makes, not a finding. Decisions with consequences for people\n"
    "  belong to the responsible experts; treat this output as one input to their judgement.\n";

static const char fit_options[] =
    "  --max-modes K        fit 1..K modes (1 to 5, default 3) and keep the K of least BIC\n"
    "  --onset T            time of the step (default: one time step before the first\n"
    "                       sample, i.e. the first sample is the first step after it);\n"
    "                       samples before it are not fitted\n"
    "  --skip LEN           leave out the first LEN after the onset: time units, N% of the\n"
    "                       record's span, or with y/mon/d on a dated axis (the same\n"
    "                       length as feedback's --skip, measured there from the first\n"
    "                       sample)\n";

static const char baseline_options[] =
    "baseline (as for feedback, by the same code):\n"
    "  --baseline FILE      a baseline (control) run, CSV, with a column of the same name:\n"
    "                       the response (and --flux with --joint) become anomalies against\n"
    "                       it over the run's own period, before the onset and --skip are\n"
    "                       applied. Refused when the baseline lacks the column or does not\n"
    "                       cover the period (within half its time step)\n"
    "  --baseline-mode M    mean: its mean over that period (default); drift: its least-\n"
    "                       squares line there, evaluated at each time (removes a control\n"
    "                       drift)\n"
    "  --baseline-offset T  the baseline's time at the run's time 0 is T (default 0: the\n"
    "                       same time axis)\n"
    "  --annual             monthly input: annual means weighted by month length in the\n"
    "                       calendar (the baseline's too); partial years at the ends are\n"
    "                       left out\n";

void cli_help_timescales(FILE *out)
{
    fputs("usage: slowscan timescales [options] FILE...\n\n"
          "Fits the response of a step-forced run as a sum of relaxation modes,\n"
          "  y(t) = sum_k a_k (1 - exp(-t / tau_k)),  t the time since the step,\n"
          "by nonlinear least squares (tau fitted as log tau), for K = 1..--max-modes, each\n"
          "started from the best of a log-spaced grid of timescales. K is chosen by a BIC that\n"
          "counts the residuals' effective sample size n (1 - r1)/(1 + r1) (Bretherton et al.\n"
          "1999): red residuals would otherwise buy spurious modes. Standard errors come from the\n"
          "Jacobian at the optimum scaled by the residual variance and inflated by n / n_eff.\n"
          "One row per mode of the chosen fit:\n"
          "  series,modes_chosen,mode,amplitude,amplitude_se,efold_time,efold_time_se,\n"
          "  flux_at_onset,flux_at_onset_se,equilibrium,equilibrium_se,n_eff,flags\n"
          "equilibrium = sum a_k. flags: unresolved (the longest e-folding time exceeds a third\n"
          "of the record), multiscale (two e-folding times differ by more than 10x), or none.\n"
          "A line per series on stderr gives the modes and the equilibrium (--quiet: none).\n\n",
          out);
    fputs(modes_input, out);
    fputs("fit:\n"
          "  --response COL       the response column (default: every column, each alone)\n", out);
    fputs(fit_options, out);
    fputs("  --joint              fit the response and a net flux (--flux COL) together with\n"
          "                       shared timescales (Proistosescu & Huybers 2017):\n"
          "                       N(t) = sum_k c_k exp(-t / tau_k), so N reaches 0 where the\n"
          "                       response reaches sum a_k; c_k is flux_at_onset, the forcing\n"
          "                       N0 = sum c_k is in --json. Each series' residuals are weighted\n"
          "                       by their own noise scale (two passes).\n", out);
    fputs(baseline_options, out);
    fputs("ensembles:\n"
          "  --ensemble           columns NAME.MEMBER of the --response NAME (at least 4\n"
          "                       members, grouped as 'slowscan help screen' says; with --joint\n"
          "                       the flux's members paired by suffix) are fitted member by\n"
          "                       member, then their mean; the rows gain a leading column\n"
          "                       member (the suffix, or mean; series is the member's column,\n"
          "                       or NAME[mean]). The split warning of screen is given on the\n"
          "                       members: a mean's modes may then describe no member\n"
          "  --members A,B,C,...  only these member suffixes; implies --ensemble\n", out);
    fputs("outputs:\n"
          "  -o FILE              the table (default: standard output)\n"
          "  --json FILE          per series: the BIC and RSS of every K, r1, n_eff, the\n"
          "                       residual sd, the equilibrium and forcing with their errors\n", out);
    fputs("  --figures DIR        timescales-SERIES: the data with the fitted modes, and the\n"
          "                       residuals\n"
          "  --figure-format png|svg|pdf\n\n", out);
    fputs(modes_cautions, out);
}

void cli_help_emulate(FILE *out)
{
    fputs("usage: slowscan emulate --step FILE:COL | STEP.csv --response COL\n"
          "                        --step-forcing F --forcing FILE:COL [--compare FILE:COL]\n\n"
          "Predicts the response to a forcing history from a step-forced run, assuming the\n"
          "response is linear (Good et al. 2011): each forcing increment starts a copy of the\n"
          "step response per unit forcing, R(t) = y_step(t) / F, and the copies add:\n"
          "  y_i = sum_{j <= i} (F_j - F_{j-1}) R((i - j) dt),  F before its first sample = 0,\n"
          "so the forcing is read as an anomaly from the state the step run started in. R comes\n"
          "from the step run's fitted modes (as 'timescales' fits them), or with --empirical from\n"
          "its own values. Records over 256 samples are convolved by FFT. The forcing's time\n"
          "step must be the step run's. One row per time of the forcing:\n"
          "  time,forcing,emulated,actual,difference,band_lower,band_upper,outside\n\n"
          "With --compare, a departure is declared where actual - emulated stays outside the\n"
          "noise band on one side for --persist consecutive samples; stderr says when (the\n"
          "first sample of that run), how large (its mean difference) and which sign. The band\n"
          "is +-z sd (z for --band-level): sd of the --control run after its linear drift is\n"
          "removed, or else of the step run's residuals from its fitted modes. The band is\n"
          "pointwise; the noise's memory is met by the persistence: by default\n"
          "ceil(3 (1 + r1)/(1 - r1)) samples, r1 the noise's lag-1 autocorrelation (3 for white\n"
          "noise, 9 at r1 = 0.5). The emulation's own error (from the fitted modes) is not in\n"
          "the band.\n\n", out);
    fputs(EMULATE_RATE_TEXT, out);
    fputs(modes_input, out);
    fputs("  (emulate: --from/--until cut the compared run only; the forcing is emulated from\n"
          "  its start, the step and control runs are read whole)\n", out);
    fputs("emulation:\n"
          "  --step FILE:COL      the step-forced run (or give its file as input with\n"
          "                       --response COL)\n"
          "  --step-forcing F     the step's forcing (its response is divided by it)\n"
          "  --forcing FILE:COL   the forcing history to emulate\n"
          "  --empirical          use the step run's values, not its fitted modes (the step run\n"
          "                       must be as long as the forcing record)\n", out);
    fputs(fit_options, out);
    fputs(baseline_options, out);
    fputs("  (emulate: the step run and the --compare run become anomalies; the forcing and\n"
          "  the --control noise run do not: the forcing is imposed, and the control's own\n"
          "  linear drift is removed for the band)\n", out);
    fputs("comparison:\n"
          "  --compare FILE:COL   the run forced so (its times on the forcing's grid)\n"
          "  --control FILE:COL   a control run for the noise band (default: the step run's\n"
          "                       residuals)\n"
          "  --band-level P       two-sided level of the band (default 0.99)\n"
          "  --persist K          consecutive samples outside the band (default: the rule above)\n"
          "outputs:\n"
          "  -o FILE              the table (default: standard output)\n"
          "  --json FILE          the departure: time, confirmation, size, sign, band, noise\n"
          "  --figures DIR        emulate-COL: actual and emulated response, the band, the\n"
          "                       departure\n"
          "  --figure-format png|svg|pdf\n\n", out);
    fputs(modes_cautions, out);
}
