# Reference values for StandFit's jackknife and bootstrap of expression models (nonlinear in their
# parameters; StandFit.Core.Uncertainty.Resampling.NonlinearResampler), from R's nls() and boot
# package, on the SAME resamples StandFit's generator drew:
#   chwirut2-pairs-indices.csv    1000 pairs resamples of NIST StRD Chwirut2 (54 points, 3 parameters)
#   misra1a-residual-indices.csv  1000 residual resamples of NIST StRD Misra1a (14 points, 2 parameters):
#                                 the indices of the centred adjusted residuals drawn
# (0-based, one resample per row, written by `dotnet run --project bench/StandFit.Benchmarks --
# fixture tests/StandFit.Tests/Resampling/Fixtures`). Run once, from the repository root
# (R 4.2.2 from Debian's r-base-core, boot from r-cran-boot):
#   Rscript tests/StandFit.Tests/Resampling/Fixtures/nls_boot_reference.R
# It reads the StRD files from ../shared/reference/nist-strd/nonlinear and writes, beside itself,
# nls-boot-reference.csv (name,value) and each case's per-resample estimates
# (<case>-estimates.csv: one resample per row, NA where nls failed). The outputs are committed;
# CI never runs R.
#
# Every fit, on the full data and on each resample, is nls() (Gauss-Newton, R's own code) from the
# full-data estimate, then Gauss-Newton steps by qr.solve() on the gradient from R's symbolic
# deriv() until a step is below 1e-15 of the parameters (at most 100): nls stops on its own
# relative-offset criterion, and the steps take the estimates to the least-squares point to working
# precision, so that the comparison measures StandFit's convergence, not nls's.
# The residual scheme: r_i / sqrt(1 - h_ii) with h the tangent-plane leverage (the diagonal of
# J (J'J)^-1 J' from the QR of the gradient J at the estimates), centred on its mean; a resample's
# response is the fitted value plus the centred adjusted residual at each drawn index.
suppressPackageStartupMessages(library(boot))
options(digits = 17)
here <- "tests/StandFit.Tests/Resampling/Fixtures"
strd <- file.path("..", "shared", "reference", "nist-strd", "nonlinear")
out <- file.path(here, "nls-boot-reference.csv")
cat(sprintf("# %s; boot %s\n", R.version.string, as.character(packageVersion("boot"))), file = out)
cat("name,value\n", file = out, append = TRUE)
emit <- function(name, value) cat(sprintf("%s,%.17g\n", name, value), file = out, append = TRUE)

read_strd <- function(file) {
  lines <- readLines(file.path(strd, file))
  header <- grep("Data +\\(lines", lines, value = TRUE)[1]
  range <- as.integer(regmatches(header, gregexpr("[0-9]+", header))[[1]])
  read.table(text = lines[range[1]:range[2]], col.names = c("y", "x"))
}

# The least-squares point from start b (a named vector), or NA when nls fails or a step is not finite.
fit <- function(model, d, b) {
  names <- names(b)
  f <- tryCatch(
    nls(as.formula(paste("y ~", deparse(model))), data = d, start = as.list(b),
        control = nls.control(maxiter = 1000, tol = 1e-6, minFactor = 1e-12)),
    error = function(e) NULL)
  if (is.null(f)) return(setNames(rep(NA_real_, length(b)), names))
  b <- coef(f)
  g <- deriv(model, names, function.arg = c("x", names))
  for (k in 1:100) {
    r <- do.call(g, c(list(x = d$x), as.list(b)))
    step <- tryCatch(qr.solve(attr(r, "gradient"), d$y - as.vector(r)), error = function(e) NULL)
    if (is.null(step) || any(!is.finite(step))) return(setNames(rep(NA_real_, length(b)), names))
    b <- b + step
    if (sqrt(sum(step^2)) <= 1e-15 * sqrt(sum(b^2))) break
  }
  b
}

indices <- function(file) as.matrix(read.csv(file.path(here, file), header = FALSE)) + 1

# One case: the full fit, the delete-one jackknife, the bootstrap replicates (one row per
# resample, NA rows failed), and boot.ci on the replicates that succeeded.
report <- function(case, model, d, start, replicate, idx) {
  b0 <- fit(model, d, start)
  p <- length(b0)
  n <- nrow(d)
  loo <- t(sapply(seq_len(n), function(i) fit(model, d[-i, ], b0)))
  reps <- t(apply(idx, 1, function(i) replicate(b0, i)))
  write.table(reps, file.path(here, paste0(case, "-estimates.csv")), sep = ",", row.names = FALSE,
              col.names = names(b0), quote = FALSE)
  ok <- apply(reps, 1, function(r) all(is.finite(r)))
  emit(paste0(case, ".failed"), sum(!ok))
  # boot() only to have a "boot" object; its t and R are replaced by the replicates that succeeded.
  set.seed(1)
  bo <- boot(d, function(data, i) rep(0, p), R = 2)
  bo$t0 <- b0
  bo$t <- reps[ok, , drop = FALSE]
  bo$R <- sum(ok)
  for (j in seq_len(p)) {
    name <- paste0(case, ".", names(b0)[j])
    theta <- loo[, j]
    # (n - 1)(theta_dot - theta_(i)): Efron and Tibshirani (1993), eq. 14.15.
    L <- (n - 1) * (mean(theta) - theta)
    emit(paste0(name, ".estimate"), b0[j])
    emit(paste0(name, ".boot_se"), sd(bo$t[, j]))
    emit(paste0(name, ".boot_bias"), mean(bo$t[, j]) - b0[j])
    emit(paste0(name, ".jack_mean"), mean(theta))
    emit(paste0(name, ".jack_se"), sqrt((n - 1) / n * sum((theta - mean(theta))^2)))
    emit(paste0(name, ".jack_bias"), (n - 1) * (mean(theta) - b0[j]))
    emit(paste0(name, ".acceleration"), sum(L^3) / (6 * sum(L^2)^1.5))
    for (i in seq_along(L)) emit(sprintf("%s.influence.%d", name, i - 1), L[i])
    for (conf in c(0.95, 0.6827)) {
      ci <- boot.ci(bo, conf = conf, type = c("perc", "basic", "bca"), index = j, L = L)
      tag <- sprintf("%s.%g", name, conf)
      emit(paste0(tag, ".perc.low"), ci$percent[4]); emit(paste0(tag, ".perc.high"), ci$percent[5])
      emit(paste0(tag, ".basic.low"), ci$basic[4]); emit(paste0(tag, ".basic.high"), ci$basic[5])
      emit(paste0(tag, ".bca.low"), ci$bca[4]); emit(paste0(tag, ".bca.high"), ci$bca[5])
    }
  }
}

# Chwirut2: y = exp(-b1 x) / (b2 + b3 x), pairs resamples, the full fit from NIST's Start 2.
chwirut2 <- read_strd("Chwirut2.dat")
chwirut2.model <- quote(exp(-b1 * x) / (b2 + b3 * x))
report("chwirut2", chwirut2.model, chwirut2, c(b1 = 0.15, b2 = 0.008, b3 = 0.010),
       function(b0, i) fit(chwirut2.model, chwirut2[i, ], b0),
       indices("chwirut2-pairs-indices.csv"))

# Misra1a: y = b1 (1 - exp(-b2 x)), residual resamples, the full fit from NIST's Start 2.
misra1a <- read_strd("Misra1a.dat")
misra1a.model <- quote(b1 * (1 - exp(-b2 * x)))
m0 <- fit(misra1a.model, misra1a, c(b1 = 250, b2 = 5e-4))
g <- deriv(misra1a.model, names(m0), function.arg = c("x", names(m0)))
at <- do.call(g, c(list(x = misra1a$x), as.list(m0)))
fitted <- as.vector(at)
h <- rowSums(qr.Q(qr(attr(at, "gradient")))^2)
adjusted <- (misra1a$y - fitted) / sqrt(1 - h)
centred <- adjusted - mean(adjusted)
report("misra1a", misra1a.model, misra1a, c(b1 = 250, b2 = 5e-4),
       function(b0, i) fit(misra1a.model, data.frame(x = misra1a$x, y = fitted + centred[i]), b0),
       indices("misra1a-residual-indices.csv"))
