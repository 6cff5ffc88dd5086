// moderato-cli: the headless face of Moderato. Every number the workbench
// shows can be reproduced here; tests and scripts call it.
#include <cstring>
#include <exception>
#include <iostream>
#include <string>
#include <vector>

#include "commands.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "password_prompt.hpp"

namespace {

const char* kHelp = R"(moderato-cli — moderated effects in regression, without a window

Usage:
  moderato-cli fit --data FILE --outcome COL --predictors A,B [options]
  moderato-cli probe [fit options] --focal A --moderator B [probe options]
  moderato-cli power --predictors K --f2 X (--n N | --power P) [power options]
  moderato-cli columns --data SOURCE [import options]
  moderato-cli render PROJECT --out DIR [--accept-changed-data]
  moderato-cli --help | --version

fit: estimates a linear, logistic, probit, Poisson or negative binomial model with
product (interaction) terms.
  --data SOURCE            a CSV/TSV/TXT file (delimiter sniffed), an .xlsx workbook,
                           sqlite:PATH (an SQLite database) or a postgresql:// address
                           without a password (libpq's ~/.pgpass or PGPASSWORD, else
                           asked for at the terminal)
                           (import options below: --sheet, --table, --query)
  --outcome COL            the column to explain
  --predictors A,B,...     main-effect columns (categorical columns are dummy-coded)
  --interaction A,B[,C]    product term; repeatable; lower-order terms are added
  --poly COL=DEGREE        COL, COL^2, ..., COL^DEGREE
  --no-intercept           fit without an intercept
  --family linear|logistic|probit|poisson|negative-binomial   (default linear)
                           logistic, probit: a 0/1 outcome; poisson, negative-binomial: a count
                           (modelled on the log scale; negative-binomial also estimates the
                           dispersion alpha)
  --exposure COL           count models: each row's exposure (time, area, people); the model
                           is for the rate per unit of COL (offset log COL)
  --se classical|hc0|hc1|hc2|hc3|hc4|cluster   (default classical)
  --cluster COL            cluster-robust standard errors (CR1) by COL
  --weights COL            weighted least squares (positive weights)
  --level 0.95             confidence level of the intervals
  --reference COL=LEVEL    reference level of a categorical column; repeatable
  --centre COL[=mean|median|VALUE]   centre a column before fitting; repeatable
  --standardise A,B        standardise columns (mean 0, SD 1)
  --log A,B / --log1p A,B  replace columns by log(x) / log(1 + x)
  --test TERM,TERM         joint Wald test of these terms (write products as A*B); repeatable
  --format json|text       output (default text; JSON fields: docs/cli-output.md)
  --stream                 fit: read the file in chunks, in 2 passes (classical SEs) or 3
                           (hc0-hc4, cluster; one fewer for a large file without categorical
                           predictors), holding a chunk rather than the table; linear models
                           (OLS, WLS) without column transforms; no fitted values kept
  --in-database            fit, probe: compute a linear model (OLS, WLS; any --se) by aggregate
                           queries in PostgreSQL, reading only sums (2 queries, 3 for robust SEs, plus
                           one per categorical predictor); a partitioned table is summed per
                           partition. probe takes its moderator values from a random sample of at
                           most 200,000 rows (the same rows each time)
  --memory-budget MB       fit: stream when an in-memory fit is estimated to need more than MB
                           (default: a quarter of physical memory); the fit's notes say so

  Multilevel (linear mixed) models, rows nested in groups:
  --groups COL             a random intercept for each group of COL
  --random-slopes A[,B]    random slopes for these numeric predictors too
  --estimation reml|ml     (default reml)
  --random-covariance full|diagonal   the random effects' covariance (default full)
  --df z|between-within|satterthwaite   df of the fixed effects' tests (default satterthwaite)
  --centre-within A[,B]    replace A by its deviation from its group's mean
  --group-means A[,B]      add A_group_mean (A's mean in each group) as a group-level predictor
  --group-effects          also report each group's conditional modes

probe: conditional effects of the focal predictor across the moderator, the
region of significance (Johnson–Neyman), the simultaneous band and crossover points.
  --focal A                the predictor whose effect is probed
  --moderator B            the column it depends on
  --moderator-values v1,v2,...   the moderator values to probe at (default: mean - SD, mean,
                           mean + SD; the 10th, 50th and 90th percentiles for a skewed moderator
                           or one whose mean +/- SD leaves the data; 0 and 1 for a 0/1 moderator)
  --moderator-percentiles 10,50,90   the moderator values at these percentiles of the data
  --second-moderator W[=VALUE]   hold a second moderator at VALUE (default its mean)
  --focal-at VALUE         where a squared focal predictor's effect is taken (default its mean)
  --scale model|outcome    model: the scale the coefficients live on (log-odds, probit, log count;
                           the default); outcome: the outcome's own scale (probability, expected
                           count, or rate per unit of the exposure)
  --average sample|values  outcome scale: average over the rows (default) or at the means
  --adjust holm|bonferroni|none   categorical moderator: how the p-values of the pairwise
                           differences between its levels are adjusted (default holm)
  --surface K              also write predictions on a K x K grid over both (numeric) predictors
  (a categorical focal predictor with a categorical moderator gives the cell table instead)
  --bootstrap N [--seed S] case (or cluster) bootstrap: percentile and BCa intervals for the
                           effects, boundaries and crossover point (N >= 100; same numbers on any core count);
                           with --smooth, also the replicates of the smooth curve's band
  Is the effect a straight line? (numeric focal predictor, moderator with more than two values)
  --bins K                 the focal predictor's effect in K bins of the moderator (at its quantiles),
                           and the test that the straight-line effect holds (K >= 2; typical 3)
  --smooth                 the effect as a smooth curve (kernel-weighted local fits at 50 points);
                           band: 200 bootstrap replicates unless --bootstrap N says otherwise
  --bandwidth H            the smooth curve's bandwidth (default: chosen by 5-fold cross-validation)
  (both also report where the data are thin across the moderator)

power: sample size and power for detecting interaction terms (Cohen's f², noncentral F).
  --predictors K --tested U --alpha A --f2 X (or --r2-full A --r2-reduced B)
  --n N (power) | --power P (smallest n) | --n N --power P --detectable (smallest f²)

columns: what the import makes of each column of a data file: its kind (numeric or
categorical), values present and missing, mean, SD and range or the number of levels.

render: writes every analysis's figures (PNG, SVG, PDF at its figure settings), tables
(CSV, Markdown, LaTeX, HTML) and memo (HTML, Markdown, PDF), and the project's kept
figures, into DIR/<analysis>/ and DIR/figures/ — no display needed; the same files the
workbench exports. A data file whose SHA-256 differs from the one the project recorded
stops the render (exit 2) unless --accept-changed-data is given.

Import options (fit, probe and columns):
  --sheet NAME             workbooks: the sheet to read (default: the first worksheet)
  --table NAME             databases: the table or view to read
  --query SQL              databases: one read-only SELECT to read instead of a table
  --delimiter comma|semicolon|tab|pipe   force the delimiter
  --no-header              the first row holds data; columns are named V1, V2, ...
  --missing TOKENS         extra missing-value tokens (always: empty, NA, NaN, .)
  --decimal-comma          numbers are written 3,14
  --categorical A,B        treat these columns as categorical
  --numeric A,B            insist these columns are numeric
  --text-missing A,B       read these columns as numbers; their cells of text are missing
  --threads N              threads for reading and fitting (default: all cores)

Exit codes: 0 success; 2 bad input or usage (the message names the problem); 1 internal error.
)";

// Runs one command (its arguments after the command's name).
int dispatch(const std::string& command, const std::vector<std::string>& rest) {
    for (const auto& a : rest)
        if (a == "--help" || a == "-h") {
            std::cout << kHelp;
            return 0;
        }
    if (command == "fit") return moderato::cli::run_fit(rest);
    if (command == "columns") return moderato::cli::run_columns(rest);
    if (command == "describe") {
        std::cerr << "moderato-cli: the command 'describe' is now called 'columns' (moderato-cli columns --data "
                     "FILE); see --help\n";
        return 2;
    }
    if (command == "probe") return moderato::cli::run_probe(rest);
    if (command == "power") return moderato::cli::run_power(rest);
    if (command == "render") {
#ifdef MODERATO_HAVE_RENDER
        return moderato::cli::run_render(rest);
#else
        std::cerr << "moderato-cli: render needs the workbench's drawing code; this build was made without it "
                     "(configure with -DMODERATO_BUILD_GUI=ON)\n";
        return 2;
#endif
    }
    std::cerr << "moderato-cli: unknown command '" << command
              << "'; commands are fit, probe, power, columns and render (see --help)\n";
    return 2;
}

}  // namespace

int main(int argc, char** argv) {
    std::vector<std::string> args(argv + 1, argv + argc);
    try {
        if (args.empty()) {
            std::cerr
                << "moderato-cli: no command given; commands are fit, probe, power, columns and render (see --help)\n";
            return 2;
        }
        if (args[0] == "--help" || args[0] == "-h" || args[0] == "help") {
            std::cout << kHelp;
            return 0;
        }
        if (args[0] == "--version") {
            std::cout << "moderato-cli " << MODERATO_VERSION << "\n";
            return 0;
        }
        const std::string command = args[0];
        const std::vector<std::string> rest(args.begin() + 1, args.end());
        return moderato::cli::with_typed_passwords([&] { return dispatch(command, rest); });
    } catch (const moderato::PasswordNeeded& e) {
        std::cerr << "moderato-cli: " << e.what() << " (there is no terminal here to ask at)\n";
        return 2;
    } catch (const moderato::InputError& e) {
        std::cerr << "moderato-cli: " << e.what() << "\n";
        return 2;
    } catch (const std::bad_alloc&) {
        std::cerr << "moderato-cli: out of memory\n";
        return 1;
    } catch (const std::exception& e) {
        std::cerr << "moderato-cli: internal error: " << e.what() << "\n";
        return 1;
    }
}
