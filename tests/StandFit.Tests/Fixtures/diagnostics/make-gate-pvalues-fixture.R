# Reference values for the p-values the residual gates judge (docs/diagnostics.md, "Why the gates
# judge a mid-p and an F form"), computed ONCE with R and committed beside this script as
# gate-pvalues-fixture.csv. CI never runs R: the tests read the committed file.
#
# Run from the repository root:   Rscript tests/StandFit.Tests/Fixtures/diagnostics/make-gate-pvalues-fixture.R
# It fits the same data sets as make-fixtures.R and make-orders-fixture.R (datasets.csv), in the
# same way (centred and scaled stimulus, poly(xs, k, raw = TRUE)), and writes for each:
#
#   Breusch-Pagan, F form   the auxiliary regression of the squared residuals on the model's terms
#                           (and a constant): summary(lm(e^2 ~ terms))$fstatistic, F on k and
#                           n - k - 1 degrees of freedom and pf(F, k, n - k - 1, lower.tail = FALSE);
#                           its R^2 times n is checked against lmtest::bptest(studentize = TRUE)
#   runs mid-p              the two-sided mid-p (Lancaster 1961) of the runs of the residual signs
#                           in stimulus and acquisition order and in each leg: twice the smaller of
#                           P(R < r) + P(R = r)/2 and P(R > r) + P(R = r)/2 under the closed-form
#                           distribution of the number of runs (Swed and Eisenhart 1943), summed
#                           with choose(); where a sign count is above 30 (StandFit's exact
#                           limit) the normal p 2 pnorm(-|z|) with the Wald-Wolfowitz mean and
#                           variance, as tseries::runs.test computes it (checked against tseries
#                           itself by make-orders-fixture.R)
#   runs within legs        the stratified test: T = the legs' run counts summed, its distribution
#                           the convolution (stats::convolve, type "open") of the legs' exact
#                           distributions; exact two-sided p (twice the smaller tail, at most 1) and
#                           the two-sided mid-p; with a leg's sign count above 30, the normal
#                           approximation with the legs' Wald-Wolfowitz means and variances summed

suppressPackageStartupMessages({
  library(lmtest)
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

# P(R = r), r = 0 .. n1 + n2, for n1 and n2 signs in random order (Swed and Eisenhart 1943).
runs_distribution <- function(n1, n2) {
  total <- choose(n1 + n2, n1)
  pr <- function(k) {
    if (k < 2) return(0)
    if (k %% 2 == 0) 2 * choose(n1 - 1, k / 2 - 1) * choose(n2 - 1, k / 2 - 1) / total
    else (choose(n1 - 1, (k - 1) / 2) * choose(n2 - 1, (k - 3) / 2) +
          choose(n1 - 1, (k - 3) / 2) * choose(n2 - 1, (k - 1) / 2)) / total
  }
  probs <- sapply(0:(n1 + n2), pr)
  stopifnot(abs(sum(probs) - 1) < 1e-12)
  probs
}

# Exact two-sided p and mid-p of t under P(T = t) = probs[t + 1].
two_sided <- function(probs, t) {
  values <- seq_along(probs) - 1
  below <- sum(probs[values < t])
  here <- probs[values == t]
  above <- sum(probs[values > t])
  c(p = min(1, 2 * min(below + here, above + here)), mid = min(1, 2 * min(below + here / 2, above + here / 2)))
}

signs_of <- function(e, ord) {
  s <- sign(e[ord])
  s[s != 0]
}

runs_mid <- function(e, ord) {
  s <- signs_of(e, ord)
  n1 <- sum(s > 0)
  n2 <- sum(s < 0)
  if (n1 < 1 || n2 < 1 || n1 + n2 < 3) return(NULL)
  r <- 1 + sum(s[-1] != s[-length(s)])
  if (n1 <= 30 && n2 <= 30) {
    ps <- two_sided(runs_distribution(n1, n2), r)
    list(count = r, n1 = n1, n2 = n2, p = ps[["p"]], mid = ps[["mid"]], exact = TRUE)
  } else {
    n <- n1 + n2
    z <- (r - (2 * n1 * n2 / n + 1)) / sqrt(2 * n1 * n2 * (2 * n1 * n2 - n) / (n^2 * (n - 1)))
    p <- 2 * pnorm(-abs(z))
    list(count = r, n1 = n1, n2 = n2, p = p, mid = p, exact = FALSE)
  }
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
  frame <- data.frame(y = y, xs = xs)
  fit <- if (intercept) lm(y ~ poly(xs, degree, raw = TRUE), data = frame) else lm(y ~ 0 + poly(xs, degree, raw = TRUE), data = frame)
  e <- residuals(fit)

  # Breusch-Pagan: Koenker's n R^2 (lmtest) and the F form of the same auxiliary regression.
  bp <- bptest(fit, varformula = ~ poly(xs, degree, raw = TRUE), studentize = TRUE, data = frame)
  frame$e2 <- e^2
  aux <- summary(lm(e2 ~ poly(xs, degree, raw = TRUE), data = frame))
  stopifnot(abs(n * aux$r.squared - bp$statistic) <= 1e-9 * max(1, bp$statistic))
  f <- aux$fstatistic
  put(name, "bp_statistic", bp$statistic)
  put(name, "bp_f", f[["value"]])
  put(name, "bp_f_df1", f[["numdf"]])
  put(name, "bp_f_df2", f[["dendf"]])
  put(name, "bp_f_p", pf(f[["value"]], f[["numdf"]], f[["dendf"]], lower.tail = FALSE))

  # Runs mid-p: stimulus (ties in acquisition order), acquisition, each leg, and within legs.
  for (case in list(list("runs_stimulus", order(x, seq_along(x))), list("runs_acquisition", seq_len(n)))) {
    result <- runs_mid(e, case[[2]])
    if (is.null(result)) next
    put(name, paste0(case[[1]], "_count"), result$count)
    put(name, paste0(case[[1]], "_p"), result$p)
    put(name, paste0(case[[1]], "_mid_p"), result$mid)
  }
  legs_found <- list()
  for (leg in c("up", "down", "unknown")) {
    idx <- which(legs == leg)
    if (length(idx) == 0) next
    result <- runs_mid(e, idx)
    if (is.null(result)) next
    put(name, paste0("runs_leg_", leg, "_mid_p"), result$mid)
    legs_found[[leg]] <- result
  }
  if (length(legs_found) > 0) {
    total <- sum(sapply(legs_found, function(l) l$count))
    put(name, "runs_within_legs_count", total)
    if (all(sapply(legs_found, function(l) l$exact))) {
      dist <- 1
      for (l in legs_found) dist <- convolve(dist, rev(runs_distribution(l$n1, l$n2)), type = "open")
      dist[abs(dist) < 1e-300] <- 0
      stopifnot(abs(sum(dist) - 1) < 1e-12)
      ps <- two_sided(dist, total)
      put(name, "runs_within_legs_p", ps[["p"]])
      put(name, "runs_within_legs_mid_p", ps[["mid"]])
    } else {
      m <- sum(sapply(legs_found, function(l) 2 * l$n1 * l$n2 / (l$n1 + l$n2) + 1))
      v <- sum(sapply(legs_found, function(l) { nn <- l$n1 + l$n2; 2 * l$n1 * l$n2 * (2 * l$n1 * l$n2 - nn) / (nn^2 * (nn - 1)) }))
      p <- 2 * pnorm(-abs((total - m) / sqrt(v)))
      put(name, "runs_within_legs_p", p)
      put(name, "runs_within_legs_mid_p", p)
    }
  }
}

versions <- sprintf("# %s; lmtest %s; written by make-gate-pvalues-fixture.R",
                    R.version.string, packageVersion("lmtest"))
con <- file(file.path(here, "gate-pvalues-fixture.csv"), "w")
writeLines(versions, con)
write.csv(do.call(rbind, rows), con, row.names = FALSE, quote = FALSE, na = "")
close(con)
