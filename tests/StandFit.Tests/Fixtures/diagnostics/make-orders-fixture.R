# Reference values for the residual orders the gates take (gates.runs_test.order and
# gates.durbin_watson.order: stimulus, acquisition, per-leg), computed ONCE with R and committed
# beside this script as orders-fixture.csv. CI never runs R: the tests read the committed file.
#
# Run from the repository root:   Rscript tests/StandFit.Tests/Fixtures/diagnostics/make-orders-fixture.R
# It fits the same data sets as make-fixtures.R (datasets.csv: NIST StRD Pontius, Norris, NoInt1, the
# synthetic-120 sweep and eight demo sweeps of sample-runs/line-3 with up and down legs), in the
# same way (centred and scaled stimulus, poly(xs, k, raw = TRUE)), and writes for each:
#
#   runs per leg          each leg's residual signs in acquisition order: the run count and
#                         tseries::runs.test's z and p (normal approximation); the exact two-sided
#                         p from the closed-form distribution of the number of runs (Wald and
#                         Wolfowitz 1940; summed here with choose(), since no packaged R function
#                         gives it), twice the smaller tail, at most 1; and the legs combined by
#                         Sidak's adjustment of the smallest leg p, 1 - (1 - p)^k (each leg's p
#                         exact while both its sign counts are at most 30, normal above, as StandFit)
#   runs, acquisition     the same on all residuals in acquisition order (exact p)
#   runs, stimulus        the same in stimulus order (ties kept in acquisition order; exact p)
#   Durbin-Watson,        lmtest::dwtest(exact = TRUE) on the data in acquisition order and on the
#   acquisition, stimulus data reordered by stimulus (the same fit, its rows permuted)
#   Durbin-Watson         d = sum of squared differences between neighbours of one leg over the sum
#   within legs           of all squared residuals; exact P(D <= d) = P(sum (mu_i - d) chi2_1 <= 0)
#                         over the n - p eigenvalues mu_i of M A M on the residual space, A the
#                         within-leg difference matrix (lmtest::dwtest's own construction with A
#                         replaced): by lmtest's Pan routine (the Fortran 'pan' that dwtest calls)
#                         and by the Imhof integral with stats::integrate at rel.tol 1e-12; the
#                         two are checked against each other here. A data set without leg labels
#                         is one leg (the value equals the acquisition-order test).

suppressPackageStartupMessages({
  library(lmtest)
  library(tseries)
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

read_sweep <- function(file) {
  d <- read.csv(file, comment.char = "#", strip.white = TRUE)
  d <- d[order(d$step), ]
  if ("pressure_kPa" %in% names(d)) list(y = d$output_mV, x = d$pressure_kPa, legs = tolower(d$leg))
  else list(y = d$output_mVV, x = d$force_kN, legs = tolower(d$leg))
}

load_data <- function(source) {
  if (startsWith(source, "nist-strd/linear/")) return(read_strd(sub("nist-strd/linear/", "", source)))
  if (startsWith(source, "sample-runs/")) return(read_sweep(source))
  d <- read.csv(file.path(here, source))
  list(x = d$stimulus, y = d$output, legs = rep("unknown", nrow(d)))
}

rows <- list()
put <- function(dataset, quantity, value, index = 0L) {
  rows[[length(rows) + 1L]] <<- data.frame(dataset = dataset, quantity = quantity, index = index,
                                          value = sprintf("%.17g", as.numeric(value)))
}

# Exact two-sided runs p: P(R = r) for n1 and n2 signs in random order.
runs_exact <- function(r, n1, n2) {
  total <- choose(n1 + n2, n1)
  pr <- function(k) {
    if (k %% 2 == 0) 2 * choose(n1 - 1, k / 2 - 1) * choose(n2 - 1, k / 2 - 1) / total
    else (choose(n1 - 1, (k - 1) / 2) * choose(n2 - 1, (k - 3) / 2) +
          choose(n1 - 1, (k - 3) / 2) * choose(n2 - 1, (k - 1) / 2)) / total
  }
  probs <- sapply(2:(n1 + n2), pr)
  stopifnot(abs(sum(probs) - 1) < 1e-12)
  lower <- sum(probs[(2:(n1 + n2)) <= r])
  upper <- sum(probs[(2:(n1 + n2)) >= r])
  min(1, 2 * min(lower, upper))
}

# The runs of the signs of e[ord] (zeros left out); NULL when the test does not apply.
runs_of <- function(e, ord) {
  s <- sign(e[ord])
  s <- s[s != 0]
  n1 <- sum(s > 0)
  n2 <- sum(s < 0)
  if (n1 < 1 || n2 < 1 || n1 + n2 < 3) return(NULL)
  r <- 1 + sum(s[-1] != s[-length(s)])
  normal <- runs.test(factor(s, levels = c(-1, 1)))
  exact <- runs_exact(r, n1, n2)
  # The p a gate judges: exact while both sign counts are at most 30, the normal approximation above.
  list(count = r, z = unname(normal$statistic), p_normal = normal$p.value, p_exact = exact,
       p = if (n1 <= 30 && n2 <= 30) exact else normal$p.value)
}

put_runs <- function(name, label, result) {
  if (is.null(result)) return(invisible())
  put(name, paste0(label, "_count"), result$count)
  put(name, paste0(label, "_z"), result$z)
  put(name, paste0(label, "_p_normal"), result$p_normal)
  put(name, paste0(label, "_p_exact"), result$p_exact)
}

imhof_lower <- function(lam) {
  f <- function(u) {
    theta <- 0.5 * colSums(atan(outer(lam, u)))
    rho <- exp(0.25 * colSums(log1p(outer(lam^2, u^2))))
    sin(theta) / (u * rho)
  }
  0.5 - integrate(f, 0, Inf, rel.tol = 1e-12, abs.tol = 1e-14, subdivisions = 5000L)$value / pi
}

pan_lower <- function(ev, d) {
  .Fortran("pan", as.double(c(d, ev)), as.integer(length(ev)), as.double(0), as.integer(15L),
           x = double(1), PACKAGE = "lmtest")$x
}

datasets <- read.csv(file.path(here, "datasets.csv"), comment.char = "#")
for (i in seq_len(nrow(datasets))) {
  name <- datasets$dataset[i]
  degree <- datasets$degree[i]
  intercept <- as.logical(datasets$intercept[i])
  data <- load_data(datasets$source[i])
  x <- data$x
  y <- data$y
  legs <- data$legs
  n <- length(y)
  xs <- if (intercept) (x - (min(x) + (max(x) - min(x)) / 2)) / ((max(x) - min(x)) / 2) else x / max(abs(x))
  fit_in <- function(ord) {
    frame <- data.frame(y = y[ord], xs = xs[ord])
    if (intercept) lm(y ~ poly(xs, degree, raw = TRUE), data = frame)
    else lm(y ~ 0 + poly(xs, degree, raw = TRUE), data = frame)
  }
  fit <- fit_in(seq_len(n))
  e <- residuals(fit)
  X <- model.matrix(fit)
  p <- ncol(X)

  # Runs: acquisition, stimulus, per leg (up, down, then unlabelled points), and the legs combined.
  by_stimulus <- order(x, seq_along(x))
  put_runs(name, "runs_acquisition", runs_of(e, seq_len(n)))
  put_runs(name, "runs_stimulus", runs_of(e, by_stimulus))
  segments <- list()
  for (leg in c("up", "down", "unknown")) {
    idx <- which(legs == leg)
    if (length(idx) > 0) segments[[leg]] <- idx
  }
  leg_p <- c()
  for (leg in names(segments)) {
    result <- runs_of(e, segments[[leg]])
    put_runs(name, paste0("runs_leg_", leg), result)
    if (!is.null(result)) leg_p <- c(leg_p, result$p)
  }
  if (length(leg_p) > 0) {
    put(name, "runs_per_leg_min_p", min(leg_p))
    put(name, "runs_per_leg_legs", length(leg_p))
    put(name, "runs_per_leg_p", 1 - (1 - min(leg_p))^length(leg_p))
  }

  # Durbin-Watson in acquisition and stimulus order.
  dw_a <- dwtest(fit, exact = TRUE)
  put(name, "dw_acquisition", dw_a$statistic)
  put(name, "dw_acquisition_p", dw_a$p.value)
  dw_s <- dwtest(fit_in(by_stimulus), exact = TRUE)
  put(name, "dw_stimulus", dw_s$statistic)
  put(name, "dw_stimulus_p", dw_s$p.value)

  # Durbin-Watson within legs.
  D <- NULL
  for (idx in segments) {
    if (length(idx) < 2) next
    for (t in 2:length(idx)) {
      row <- numeric(n)
      row[idx[t]] <- 1
      row[idx[t - 1]] <- -1
      D <- rbind(D, row)
    }
  }
  A <- crossprod(D)
  d <- sum((D %*% e)^2) / sum(e^2)
  M <- diag(n) - X %*% solve(crossprod(X)) %*% t(X)
  ev <- eigen(M %*% A %*% M, symmetric = TRUE, only.values = TRUE)$values[1:(n - p)]
  ev[abs(ev) < 1e-10] <- 0
  p_imhof <- imhof_lower(ev - d)
  p_pan <- pan_lower(ev, d)
  stopifnot(abs(p_imhof - p_pan) < 1e-5)
  put(name, "dw_per_leg", d)
  put(name, "dw_per_leg_p_imhof", p_imhof)
  put(name, "dw_per_leg_p_pan", p_pan)
  put(name, "dw_per_leg_zero_eigenvalues", sum(ev == 0))
}

versions <- sprintf("# %s; lmtest %s, tseries %s; written by make-orders-fixture.R",
                    R.version.string, packageVersion("lmtest"), packageVersion("tseries"))
con <- file(file.path(here, "orders-fixture.csv"), "w")
writeLines(versions, con)
write.csv(do.call(rbind, rows), con, row.names = FALSE, quote = FALSE, na = "")
close(con)
