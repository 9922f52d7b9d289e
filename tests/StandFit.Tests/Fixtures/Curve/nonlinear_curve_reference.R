# Reference values for expression models fitted by Levenberg-Marquardt and for the uses of their
# curves (StandFit.Core.Curve on a NonlinearFitResult), computed by R's nls() (Gauss-Newton, its
# own code) and, for the bands, sensitivities and inverse predictions, by the delta method with
# gradients from R's symbolic deriv() and D(), which share no code with StandFit. nls gives the
# start of six Gauss-Newton steps (qr.solve) that polish its estimates to working precision. Run from the
# repository root (R 4.2.2 from Debian's r-base-core; base R only):
#
#     Rscript tests/StandFit.Tests/Fixtures/Curve/nonlinear_curve_reference.R
#
# It reads thermistor-sweep.csv (written by curve_reference.R beside it), writes the invented
# seeded sweep rise-sweep.csv, and writes nonlinear-curve-reference.csv, one value per line:
# case,quantity,index,value (17 digits). The conventions are docs/curve.md's:
# - se(yhat(x0))^2 = g' V g, g the gradient of the model with respect to the parameters at x0 and
#   V = vcov(nls); confidence band yhat +/- t se, prediction band yhat +/- t sqrt(s^2 + se^2);
# - sensitivity dy/dx at x0 with se = sqrt(h' V h), h the gradient of dy/dx with respect to the
#   parameters (D() of the model, then deriv() of that);
# - inverse prediction: x0 solves yhat(x0) = y0 (uniroot), se = sqrt(s^2 + se(yhat(x0))^2) / |yhat'(x0)|,
#   and the inverse interval where (yhat(x) - y0)^2 = t^2 (s^2 + se(yhat(x))^2), by uniroot each side.

options(digits = 17)
RNGkind("Mersenne-Twister", "Inversion", "Rejection")
here <- "tests/StandFit.Tests/Fixtures/Curve"
level <- 0.95
rows <- list()
put <- function(case, quantity, values) {
  for (i in seq_along(values)) {
    rows[[length(rows) + 1]] <<- sprintf("%s,%s,%d,%.17g", case, quantity, i - 1, values[[i]])
  }
}

# model: a formula's right-hand side in x and the parameters; data: x and y; start: named list.
reference <- function(case, model, data, start, points, y0s) {
  fit <- nls(as.formula(paste("y ~", deparse(model))), data = data, start = start,
             control = nls.control(maxiter = 1000, tol = 5e-8, minFactor = 1e-12))
  names <- names(start)
  b <- as.list(coef(fit))
  value <- deriv(model, names, function.arg = c("x", names))
  slope_expr <- D(model, "x")
  slope <- deriv(slope_expr, names, function.arg = c("x", names))
  at <- function(f, x) {
    r <- do.call(f, c(list(x = x), b))
    list(v = as.vector(r), g = attr(r, "gradient"))
  }
  # nls stops on its relative-offset criterion; a few Gauss-Newton steps (QR of the gradient)
  # take the estimates to the least-squares point to working precision, and the covariance is
  # s^2 (J'J)^-1 from the QR of J there (as vcov.nls computes it).
  for (k in 1:6) {
    p <- at(value, data$x)
    b <- as.list(setNames(unlist(b) + qr.solve(p$g, data$y - p$v), names))
  }
  p <- at(value, data$x)
  df <- length(data$y) - length(names)
  s2 <- sum((data$y - p$v)^2) / df
  q <- qr(p$g)
  unpivot <- order(q$pivot)
  V <- s2 * chol2inv(qr.R(q))[unpivot, unpivot]
  tc <- qt(1 - (1 - level) / 2, df)
  put(case, "coef", unlist(b))
  put(case, "se", sqrt(diag(V)))
  put(case, "sigma", sqrt(s2))
  put(case, "df", df)
  put(case, "cor", as.vector(t(cov2cor(V))))
  put(case, "nls_coef", coef(fit))
  se_of <- function(g) sqrt(rowSums((g %*% V) * g))
  v <- at(value, points)
  se <- se_of(v$g)
  put(case, "band_x", points)
  put(case, "band_fit", v$v)
  put(case, "band_se", se)
  put(case, "conf_lwr", v$v - tc * se)
  put(case, "conf_upr", v$v + tc * se)
  put(case, "pred_lwr", v$v - tc * sqrt(s2 + se^2))
  put(case, "pred_upr", v$v + tc * sqrt(s2 + se^2))
  d <- at(slope, points)
  put(case, "sens", d$v)
  put(case, "sens_se", se_of(d$g))
  lo <- min(data$x)
  hi <- max(data$x)
  tol <- (hi - lo) * 1e-15
  out <- NULL
  for (y0 in y0s) {
    x0 <- uniroot(function(x) at(value, x)$v - y0, c(lo, hi), tol = tol, maxiter = 2000)$root
    p0 <- at(value, x0)
    sx0 <- sqrt(s2 + se_of(p0$g)^2) / abs(at(slope, x0)$v)
    band <- function(x) {
      p <- at(value, x)
      (p$v - y0)^2 - tc^2 * (s2 + se_of(p$g)^2)
    }
    low <- uniroot(band, c(lo, x0), tol = tol, maxiter = 2000)$root
    high <- uniroot(band, c(x0, hi), tol = tol, maxiter = 2000)$root
    out <- rbind(out, c(y0, x0, sx0, low, high, at(slope, x0)$v))
  }
  for (j in 1:6) {
    put(case, c("inv_y0", "inv_x0", "inv_se", "inv_lwr", "inv_upr", "inv_slope")[j], out[, j])
  }
}

# ---- The invented 10 kohm NTC thermistor of curve_reference.R, as the Beta model R(T) ----------
ntc <- read.csv(file.path(here, "thermistor-sweep.csv"))
reference("beta", quote(R25 * exp(beta * (1 / x - 1 / 298.15))),
          data.frame(x = ntc$temp_K, y = ntc$r_ohm), list(R25 = 9000, beta = 3500),
          c(263.15, 298.15, 333.15), c(20000, 10000, 3000))

# ---- An invented saturating sensor: 41 points, output = y0 + span (1 - exp(-x / tau)) --------
set.seed(20261203)
x <- seq(0, 100, by = 2.5)
y <- round(0.5 + 4 * (1 - exp(-x / 30)) + rnorm(length(x), sd = 0.002), 5)
write.csv(data.frame(x_pct = x, out_V = y), file.path(here, "rise-sweep.csv"), row.names = FALSE, quote = FALSE)
reference("rise", quote(y0 + span * (1 - exp(-x / tau))), data.frame(x = x, y = y),
          list(y0 = 0, span = 3, tau = 20), c(0, 10, 50, 100), c(1.5, 3.0, 4.2))

header <- sprintf("# produced by nonlinear_curve_reference.R (beside this file) with %s", R.version.string)
writeLines(c(header, "# case,quantity,index,value", unlist(rows)), file.path(here, "nonlinear-curve-reference.csv"))
