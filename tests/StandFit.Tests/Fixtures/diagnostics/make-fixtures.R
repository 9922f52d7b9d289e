# Reference values for StandFit's residual diagnostics and figures of merit, computed ONCE with R and
# committed beside this script (diagnostics-fixture.csv, datasets.csv). CI never runs R: the tests
# read the committed files.
#
# Run from the repository root:   Rscript tests/StandFit.Tests/Fixtures/diagnostics/make-fixtures.R
# It reads the NIST StRD files from ../shared/reference/nist-strd/linear and sweep files from
# sample-runs/line-3, and writes the two CSV files next to this script.
#
# Every reference is a packaged R function where one exists:
#   runs test           tseries::runs.test (normal approximation) on the residual signs
#   Durbin-Watson       lmtest::dwtest (default: exact p by Pan's algorithm for n < 100,
#                       alternative "greater"), plus the Imhof integral of the same eigenvalues by
#                       stats::integrate at rel.tol 1e-12 (a tighter second reference)
#   lag-1 correlation   stats::acf, stats::Box.test(type = "Ljung-Box", lag = 1)
#   lack of fit         anova(lm(y ~ x), lm(y ~ factor(set point)))
#   curvature           anova(lm(y ~ poly(x, k, raw = TRUE)), lm(y ~ poly(x, k + 1, raw = TRUE)))
#   Breusch-Pagan       lmtest::bptest(studentize = TRUE), variance regressors = the model's terms
#   Shapiro-Wilk        stats::shapiro.test
#   Anderson-Darling    nortest::ad.test
#   points              stats::rstandard, rstudent, hatvalues, cooks.distance; the Bonferroni test
#                       checked against car::outlierTest
#   histogram           stats::quantile(type = 7) for the IQR, findInterval for the counts
#   figures of merit    base R on the set-point means; the minimax line by brute force over every
#                       pair of set points (the Chebyshev line's slope is the slope of one such pair)
#
# The stimulus is centred and scaled (xs = (x - mid) / half, or x / max|x| without a constant) before
# the polynomial terms are formed: the column spaces, fitted values, residuals and every statistic
# are those of poly(x, k, raw = TRUE), and Pontius's x^2 (up to 9e12) stays well conditioned.

suppressPackageStartupMessages({
  library(lmtest)
  library(tseries)
  library(nortest)
  library(car)
})

here <- "tests/StandFit.Tests/Fixtures/diagnostics"
stopifnot(dir.exists(here))
strd <- "../shared/reference/nist-strd/linear"

read_strd <- function(file) {
  lines <- readLines(file.path(strd, file))
  range <- regmatches(lines[1:10], regexpr("Data +\\(lines +[0-9]+ to +[0-9]+\\)", lines[1:10]))
  bounds <- as.integer(regmatches(range, gregexpr("[0-9]+", range))[[1]])
  rows <- read.table(text = lines[bounds[1]:bounds[2]])
  list(y = rows[[1]], x = rows[[2]], legs = rep("unknown", nrow(rows)))
}

read_sweep <- function(file, xcol, ycol) {
  d <- read.csv(file.path("sample-runs/line-3", file), comment.char = "#", strip.white = TRUE)
  d <- d[order(d$step), ]
  list(y = d[[ycol]], x = d[[xcol]], legs = tolower(d$leg))
}

set_points <- function(x, tol) {
  o <- order(x, seq_along(x))
  g <- integer(length(x))
  id <- 1L
  g[o[1]] <- id
  for (i in seq_along(o)[-1]) {
    if (x[o[i]] - x[o[i - 1]] > tol) id <- id + 1L
    g[o[i]] <- id
  }
  g
}

rows <- list()
put <- function(dataset, quantity, value, index = 0L) {
  rows[[length(rows) + 1L]] <<- data.frame(dataset = dataset, quantity = quantity, index = index,
                                          value = sprintf("%.17g", as.numeric(value)))
}
put_vector <- function(dataset, quantity, values) {
  for (i in seq_along(values)) put(dataset, quantity, values[[i]], i)
}

imhof_lower <- function(ev, d) {
  lam <- ev - d
  f <- function(u) {
    theta <- 0.5 * colSums(atan(outer(lam, u)))
    rho <- exp(0.25 * colSums(log1p(outer(lam^2, u^2))))
    sin(theta) / (u * rho)
  }
  0.5 - integrate(f, 0, Inf, rel.tol = 1e-12, abs.tol = 1e-14, subdivisions = 5000L)$value / pi
}

runs_row <- function(name, order_name, e, ord) {
  s <- sign(e[ord])
  s <- s[s != 0]
  r <- runs.test(factor(s, levels = c(-1, 1)))
  put(name, paste0("runs_", order_name, "_z"), r$statistic)
  put(name, paste0("runs_", order_name, "_p_normal"), r$p.value)
  put(name, paste0("runs_", order_name, "_count"), 1 + sum(s[-1] != s[-length(s)]))
}

fixture <- function(name, data, degree, intercept, tol, nominal = NULL) {
  x <- data$x
  y <- data$y
  n <- length(y)
  xs <- if (intercept) (x - (min(x) + (max(x) - min(x)) / 2)) / ((max(x) - min(x)) / 2) else x / max(abs(x))
  frame <- data.frame(y = y, xs = xs)
  model <- function(k) {
    if (intercept) lm(y ~ poly(xs, k, raw = TRUE), data = frame)
    else lm(y ~ 0 + poly(xs, k, raw = TRUE), data = frame)
  }
  fit <- model(degree)
  p <- length(coef(fit))
  e <- residuals(fit)
  put(name, "n", n)
  put(name, "residual_sd", sigma(fit))

  # Residual orders: acquisition (data order) and stimulus (stable: ties keep acquisition order).
  by_stimulus <- order(x, seq_along(x))
  runs_row(name, "stimulus", e, by_stimulus)
  runs_row(name, "acquisition", e, seq_len(n))

  # Durbin-Watson, acquisition order.
  dw <- dwtest(fit, exact = TRUE) # the default for n < 100; asked for explicitly so n = 120 gets it too
  put(name, "dw_statistic", dw$statistic)
  put(name, "dw_p_pan", dw$p.value)
  X <- model.matrix(fit)
  A <- diag(c(1, rep(2, n - 2), 1))
  A[abs(row(A) - col(A)) == 1] <- -1
  M <- diag(n) - X %*% solve(crossprod(X)) %*% t(X)
  ev <- eigen(M %*% A %*% M, symmetric = TRUE, only.values = TRUE)$values
  ev <- ev[ev > 1e-10]
  put(name, "dw_p_imhof", imhof_lower(ev, dw$statistic))
  put_vector(name, "dw_eigenvalues", sort(ev))

  # Lag-1 autocorrelation and the Ljung-Box test at lag 1.
  put(name, "lag1_autocorrelation", acf(e, lag.max = 1, plot = FALSE)$acf[2])
  lb <- Box.test(e, lag = 1, type = "Ljung-Box")
  put(name, "ljung_box_q", lb$statistic)
  put(name, "ljung_box_p", lb$p.value)

  # Lack of fit against the set-point means.
  g <- set_points(x, tol)
  groups <- length(unique(g))
  put(name, "set_points", groups)
  if (groups > p && n > groups) {
    lof <- anova(fit, lm(y ~ factor(g)))
    put(name, "lof_f", lof$F[2])
    put(name, "lof_df1", lof$Df[2])
    put(name, "lof_df2", lof$Res.Df[2])
    put(name, "lof_p", lof$`Pr(>F)`[2])
  }

  # Curvature: the next power.
  curv <- anova(fit, model(degree + 1))
  put(name, "curvature_f", curv$F[2])
  put(name, "curvature_df2", curv$Res.Df[2])
  put(name, "curvature_p", curv$`Pr(>F)`[2])

  # Breusch-Pagan (Koenker): variance regressors 1 and the model's terms.
  bp <- bptest(fit, varformula = ~ poly(xs, degree, raw = TRUE), studentize = TRUE, data = frame)
  put(name, "bp_statistic", bp$statistic)
  put(name, "bp_df", bp$parameter)
  put(name, "bp_p", bp$p.value)

  # Normality.
  sw <- shapiro.test(e)
  put(name, "sw_w", sw$statistic)
  put(name, "sw_p", sw$p.value)
  ad <- ad.test(e)
  put(name, "ad_a2", ad$statistic)
  put(name, "ad_astar", ad$statistic * (1 + 0.75 / n + 2.25 / n^2))
  put(name, "ad_p", ad$p.value)
  centred <- e - mean(e)
  m2 <- mean(centred^2)
  put(name, "skewness", mean(centred^3) / m2^1.5)
  put(name, "excess_kurtosis", mean(centred^4) / m2^2 - 3)

  # Points.
  rs <- rstudent(fit)
  put_vector(name, "leverage", hatvalues(fit))
  put_vector(name, "rstandard", rstandard(fit))
  put_vector(name, "rstudent", rs)
  put_vector(name, "cooks_distance", cooks.distance(fit))
  worst <- which.max(abs(rs))
  p_one <- 2 * pt(abs(rs[worst]), n - p - 1, lower.tail = FALSE)
  bonferroni <- min(1, n * p_one)
  check <- outlierTest(fit, cutoff = Inf, n.max = 1)
  stopifnot(isTRUE(all.equal(unname(min(1, check$bonf.p)), unname(bonferroni), tolerance = 1e-12)))
  put(name, "outlier_index", worst)
  put(name, "max_abs_rstudent", abs(rs[worst]))
  put(name, "outlier_p_unadjusted", p_one)
  put(name, "outlier_p", bonferroni)

  # Histogram: Freedman-Diaconis width 2 IQR n^(-1/3), IQR from type-7 quantiles; equal bins from
  # min to max; [a, b) bins, the last one closed.
  q <- quantile(e, c(0.25, 0.75), type = 7, names = FALSE)
  width <- 2 * (q[2] - q[1]) * n^(-1 / 3)
  lo <- min(e)
  hi <- max(e)
  bins <- if (width > 0) max(1, ceiling((hi - lo) / width)) else 1
  step <- (hi - lo) / bins
  edges <- lo + (0:bins) * step
  edges[bins + 1] <- hi
  counts <- tabulate(findInterval(e, edges, rightmost.closed = TRUE), nbins = bins)
  put(name, "histogram_iqr", q[2] - q[1])
  put_vector(name, "histogram_edges", edges)
  put_vector(name, "histogram_counts", counts)

  # Figures of merit on the set-point means (the calibration curve).
  legs <- data$legs
  classes <- c("up", "down", "unknown")
  xbar <- numeric(groups)
  ybar <- numeric(groups)
  hyst <- c()
  spread <- c()
  for (k in seq_len(groups)) {
    xm <- c()
    ym <- c()
    for (cl in classes) {
      sel <- g == k & legs == cl
      if (any(sel)) {
        xm <- c(xm, mean(x[sel]))
        ym <- c(ym, mean(y[sel]))
        if (sum(sel) >= 2) spread <- c(spread, max(y[sel]) - min(y[sel]))
      }
    }
    xbar[k] <- mean(xm)
    ybar[k] <- mean(ym)
    up <- g == k & legs == "up"
    down <- g == k & legs == "down"
    if (any(up) && any(down)) hyst <- c(hyst, abs(mean(y[up]) - mean(y[down])))
  }
  fso <- ybar[groups] - ybar[1]
  put(name, "fso", fso)
  put_vector(name, "curve_stimulus", xbar)
  put_vector(name, "curve_output", ybar)
  terminal <- ybar[1] + (ybar[groups] - ybar[1]) / (xbar[groups] - xbar[1]) * (xbar - xbar[1])
  put(name, "nonlinearity_terminal_pct", 100 * max(abs(ybar - terminal)) / abs(fso))
  ls <- lm(ybar ~ xbar)
  put(name, "nonlinearity_ls_pct", 100 * max(abs(residuals(ls))) / abs(fso))
  best <- Inf
  for (i in seq_len(groups - 1)) for (j in (i + 1):groups) {
    slope <- (ybar[j] - ybar[i]) / (xbar[j] - xbar[i])
    r <- ybar - slope * xbar
    best <- min(best, (max(r) - min(r)) / 2)
  }
  put(name, "nonlinearity_minimax_pct", 100 * best / abs(fso))
  if (length(hyst) > 0) put(name, "hysteresis_pct", 100 * max(hyst) / abs(fso))
  if (length(spread) > 0) put(name, "nonrepeatability_pct", 100 * max(spread) / abs(fso))
  if (!is.null(nominal)) {
    nominal_at <- function(v) nominal[1] + nominal[2] * v
    put(name, "zero_error_pct", 100 * (ybar[1] - nominal_at(xbar[1])) / abs(fso))
    put(name, "span_error_pct", 100 * (fso - nominal[2] * (xbar[groups] - xbar[1])) / abs(fso))
    put(name, "max_error_pct", 100 * max(abs(y - nominal_at(x))) / abs(fso))
  }
  put(name, "llf", 2.4 * sigma(fit))

  data.frame(dataset = name, source = data$source, degree = degree, intercept = intercept,
             tolerance = tol,
             nominal_offset = if (is.null(nominal)) NA else nominal[1],
             nominal_gain = if (is.null(nominal)) NA else nominal[2])
}

# A longer sweep of our own, for the large-sample branches (runs test by the normal approximation,
# Shapiro-Wilk for n >= 12, the Imhof integral with many eigenvalues): a straight line with a slow
# ripple and seeded noise, written once to synthetic-120.csv beside this script and read from there.
synthetic <- function() {
  file <- file.path(here, "synthetic-120.csv")
  if (!file.exists(file)) {
    set.seed(20261202)
    x <- seq(0, 119) * 2.5
    y <- 0.2 * x + 0.004 * sin(x / 40) + rnorm(120, sd = 0.004)
    writeLines(c("stimulus,output", sprintf("%.17g,%.17g", x, y)), file)
  }
  d <- read.csv(file)
  list(x = d$stimulus, y = d$output, legs = rep("unknown", nrow(d)), source = "synthetic-120.csv")
}

strd_set <- function(file) { d <- read_strd(file); d$source <- paste0("nist-strd/linear/", file); d }
kp <- function(serial) { d <- read_sweep(paste0(serial, ".csv"), "pressure_kPa", "output_mV"); d$source <- paste0("sample-runs/line-3/", serial, ".csv"); d }
lc <- function(serial) { d <- read_sweep(paste0(serial, ".csv"), "force_kN", "output_mVV"); d$source <- paste0("sample-runs/line-3/", serial, ".csv"); d }

datasets <- rbind(
  fixture("pontius-line", strd_set("Pontius.dat"), 1, TRUE, 0),
  fixture("pontius-quadratic", strd_set("Pontius.dat"), 2, TRUE, 0),
  fixture("norris-line", strd_set("Norris.dat"), 1, TRUE, 0),
  fixture("noint1-through-zero", strd_set("NoInt1.dat"), 1, FALSE, 0),
  fixture("synthetic-120", synthetic(), 1, TRUE, 0),
  fixture("KP250-26110-0001", kp("KP250-26110-0001"), 1, TRUE, 1.0, c(0, 0.2)),
  fixture("KP250-26110-0002", kp("KP250-26110-0002"), 1, TRUE, 1.0, c(0, 0.2)),
  fixture("KP250-26110-0003", kp("KP250-26110-0003"), 1, TRUE, 1.0, c(0, 0.2)),
  fixture("KP250-26110-0022", kp("KP250-26110-0022"), 1, TRUE, 1.0, c(0, 0.2)),
  fixture("KP250-26110-0027", kp("KP250-26110-0027"), 1, TRUE, 1.0, c(0, 0.2)),
  fixture("LC5K-26110-0001", lc("LC5K-26110-0001"), 2, TRUE, 0.01, c(0, 0.4)),
  fixture("LC5K-26110-0002", lc("LC5K-26110-0002"), 2, TRUE, 0.01, c(0, 0.4)),
  fixture("LC5K-26110-0009", lc("LC5K-26110-0009"), 2, TRUE, 0.01, c(0, 0.4))
)

versions <- sprintf("# %s; lmtest %s, tseries %s, nortest %s, car %s; written by make-fixtures.R",
                    R.version.string, packageVersion("lmtest"), packageVersion("tseries"),
                    packageVersion("nortest"), packageVersion("car"))
write_with_header <- function(frame, file) {
  con <- file(file.path(here, file), "w")
  writeLines(versions, con)
  write.csv(frame, con, row.names = FALSE, quote = FALSE, na = "")
  close(con)
}
write_with_header(datasets, "datasets.csv")
write_with_header(do.call(rbind, rows), "diagnostics-fixture.csv")
