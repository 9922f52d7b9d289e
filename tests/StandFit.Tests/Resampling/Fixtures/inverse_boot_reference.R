# Reference values for StandFit's resampled inverse predictions (inverse_at: the stimulus at which
# each refitted curve gives the output y0), from R's lm(), nls(), uniroot() and boot package, on
# the SAME resamples StandFit's generator drew:
#   pontius-pairs-indices.csv     1000 pairs resamples of NIST StRD Pontius (40 points; quadratic, lm)
#   chwirut2-pairs-indices.csv    1000 pairs resamples of NIST StRD Chwirut2 (54 points; nls)
#   misra1a-residual-indices.csv  1000 residual resamples of NIST StRD Misra1a (14 points; nls): the
#                                 indices of the centred adjusted residuals drawn
# (0-based, one resample per row, written by `dotnet run --project bench/StandFit.Benchmarks --
# fixture tests/StandFit.Tests/Resampling/Fixtures`). Run once, from the repository root
# (R 4.2.2 from Debian's r-base-core, boot from r-cran-boot):
#   Rscript tests/StandFit.Tests/Resampling/Fixtures/inverse_boot_reference.R
# It reads the StRD files from ../shared/reference/nist-strd and writes, beside itself,
# inverse-boot-reference.csv (name,value; its first line the R and boot versions) and each case's
# roots (<case>-inverse-roots.csv: the full-data root, then one line per bootstrap resample, then
# one per delete-one deletion). The outputs are committed; CI never runs R.
#
# Each curve is refitted by R alone: lm() on the centred and scaled stimulus for the quadratic (the
# root does not depend on how x is scaled), and for the nonlinear models nls() from the full-data
# estimate polished by Gauss-Newton steps to the least-squares point, as in nls_boot_reference.R.
# The root is then uniroot() (Brent's method) on the calibrated range [min x, max x] of the unit's
# own data, with tol = 1e-14 |x| and maxiter 1000; every curve here is monotonic on the range and
# reaches y0 inside it, which the script checks (a sign change between the ends). boot.ci then runs
# types "perc" and "bca" on the roots (L the jackknife influence values, (n - 1)(theta_dot - theta_(i)),
# Efron and Tibshirani 1993, eq. 14.15), at 95 % and 68.27 %.
suppressPackageStartupMessages(library(boot))
options(digits = 17)
here <- "tests/StandFit.Tests/Resampling/Fixtures"
strd <- file.path("..", "shared", "reference", "nist-strd")
out <- file.path(here, "inverse-boot-reference.csv")
cat(sprintf("# %s; boot %s\n", R.version.string, as.character(packageVersion("boot"))), file = out)
cat("name,value\n", file = out, append = TRUE)
emit <- function(name, value) cat(sprintf("%s,%.17g\n", name, value), file = out, append = TRUE)

read_strd <- function(folder, file) {
  lines <- readLines(file.path(strd, folder, file))
  header <- grep("Data +\\(lines", lines, value = TRUE)[1]
  range <- as.integer(regmatches(header, gregexpr("[0-9]+", header))[[1]])
  read.table(text = lines[range[1]:range[2]], col.names = c("y", "x"))
}

indices <- function(file) as.matrix(read.csv(file.path(here, file), header = FALSE)) + 1

# The x in [lo, hi] where curve(x) = y0, by uniroot; stops when the ends do not bracket a root.
root <- function(curve, y0, lo, hi) {
  g <- function(x) curve(x) - y0
  if (sign(g(lo)) == sign(g(hi))) stop("no sign change on the range")
  uniroot(g, c(lo, hi), tol = 1e-14 * max(abs(lo), abs(hi)), maxiter = 1000)$root
}

# The nonlinear least-squares point from start b, as in nls_boot_reference.R.
nls_fit <- function(model, d, b) {
  names <- names(b)
  f <- nls(as.formula(paste("y ~", deparse(model))), data = d, start = as.list(b),
           control = nls.control(maxiter = 1000, tol = 1e-6, minFactor = 1e-12))
  b <- coef(f)
  g <- deriv(model, names, function.arg = c("x", names))
  for (k in 1:100) {
    r <- do.call(g, c(list(x = d$x), as.list(b)))
    step <- qr.solve(attr(r, "gradient"), d$y - as.vector(r))
    b <- b + step
    if (sqrt(sum(step^2)) <= 1e-15 * sqrt(sum(b^2))) break
  }
  b
}

# One case: the full-data root, the delete-one roots, the bootstrap roots, boot.ci.
report <- function(case, d, refit_root, replicate_root, idx) {
  n <- nrow(d)
  t0 <- refit_root(d)
  loo <- sapply(seq_len(n), function(i) refit_root(d[-i, ]))
  reps <- apply(idx, 1, replicate_root)
  writeLines(sprintf("%.17g", c(t0, reps, loo)), file.path(here, paste0(case, "-inverse-roots.csv")))
  set.seed(1)
  bo <- boot(d, function(data, i) 0, R = 2)
  bo$t0 <- t0
  bo$t <- matrix(reps, ncol = 1)
  bo$R <- length(reps)
  L <- (n - 1) * (mean(loo) - loo)
  emit(paste0(case, ".estimate"), t0)
  emit(paste0(case, ".boot_se"), sd(reps))
  emit(paste0(case, ".boot_bias"), mean(reps) - t0)
  emit(paste0(case, ".jack_se"), sqrt((n - 1) / n * sum((loo - mean(loo))^2)))
  emit(paste0(case, ".acceleration"), sum(L^3) / (6 * sum(L^2)^1.5))
  for (conf in c(0.95, 0.6827)) {
    ci <- boot.ci(bo, conf = conf, type = c("perc", "bca"), L = L)
    tag <- sprintf("%s.%g", case, conf)
    emit(paste0(tag, ".perc.low"), ci$percent[4]); emit(paste0(tag, ".perc.high"), ci$percent[5])
    emit(paste0(tag, ".bca.low"), ci$bca[4]); emit(paste0(tag, ".bca.high"), ci$bca[5])
  }
}

# Pontius: the quadratic y = b0 + b1 x + b2 x^2 (lm), pairs resamples, y0 = 1.
pontius <- read_strd("linear", "Pontius.dat")
pontius.y0 <- 1
lo <- min(pontius$x); hi <- max(pontius$x)
centre <- mean(pontius$x); scale <- sd(pontius$x)
pontius_root <- function(d) {
  s <- (d$x - centre) / scale
  b <- coef(lm(d$y ~ s + I(s^2)))
  root(function(x) { u <- (x - centre) / scale; b[1] + b[2] * u + b[3] * u^2 }, pontius.y0, lo, hi)
}
report("pontius", pontius, pontius_root, function(i) pontius_root(pontius[i, ]),
       indices("pontius-pairs-indices.csv"))

# Chwirut2: y = exp(-b1 x) / (b2 + b3 x), pairs resamples, y0 = 20, the full fit from NIST's Start 2.
chwirut2 <- read_strd("nonlinear", "Chwirut2.dat")
chwirut2.model <- quote(exp(-b1 * x) / (b2 + b3 * x))
chwirut2.y0 <- 20
c0 <- nls_fit(chwirut2.model, chwirut2, c(b1 = 0.15, b2 = 0.008, b3 = 0.010))
chwirut2_root <- function(d) {
  b <- nls_fit(chwirut2.model, d, c0)
  root(function(x) exp(-b[1] * x) / (b[2] + b[3] * x), chwirut2.y0, min(chwirut2$x), max(chwirut2$x))
}
report("chwirut2", chwirut2, chwirut2_root, function(i) chwirut2_root(chwirut2[i, ]),
       indices("chwirut2-pairs-indices.csv"))

# Misra1a: y = b1 (1 - exp(-b2 x)), residual resamples, y0 = 40, the full fit from NIST's Start 2.
misra1a <- read_strd("nonlinear", "Misra1a.dat")
misra1a.model <- quote(b1 * (1 - exp(-b2 * x)))
misra1a.y0 <- 40
m0 <- nls_fit(misra1a.model, misra1a, c(b1 = 250, b2 = 5e-4))
g <- deriv(misra1a.model, names(m0), function.arg = c("x", names(m0)))
at <- do.call(g, c(list(x = misra1a$x), as.list(m0)))
fitted <- as.vector(at)
h <- rowSums(qr.Q(qr(attr(at, "gradient")))^2)
adjusted <- (misra1a$y - fitted) / sqrt(1 - h)
centred <- adjusted - mean(adjusted)
misra1a_root <- function(d) {
  b <- nls_fit(misra1a.model, d, m0)
  root(function(x) b[1] * (1 - exp(-b[2] * x)), misra1a.y0, min(misra1a$x), max(misra1a$x))
}
report("misra1a", misra1a, misra1a_root,
       function(i) misra1a_root(data.frame(x = misra1a$x, y = fitted + centred[i])),
       indices("misra1a-residual-indices.csv"))
