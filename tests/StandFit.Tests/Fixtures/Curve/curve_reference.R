# Reference values for the uses of a fitted curve (StandFit.Core.Curve) and for weighted and
# multi-input least squares, computed by R's lm() and predict() and by msm::deltamethod, which
# share no code with StandFit. Run from the repository root (R 4.2.2 from Debian's r-base-core,
# msm from r-cran-msm):
#
#     Rscript tests/StandFit.Tests/Fixtures/Curve/curve_reference.R
#
# It writes, beside itself, the four invented sweeps it fits (transmitter-sweep.csv,
# surface-sweep.csv, thermistor-sweep.csv, pt100-sweep.csv; seeded, so a rerun gives the same
# files) and curve-reference.csv, one value per line: case,quantity,index,value (17 digits).
# The Pontius case reads the NIST StRD file from ../shared/reference/nist-strd/linear.
#
# Conventions, as StandFit documents them (docs/curve.md):
# - confidence band: yhat(x0) +/- t(1 - alpha/2, df) se(yhat(x0)), predict(interval = "confidence");
# - prediction band: yhat(x0) +/- t sqrt(s^2 / w0 + se^2), predict(interval = "prediction"),
#   w0 = 1/u0^2 the new reading's weight (1 when unweighted);
# - inverse prediction x0 solves yhat(x0) = y0 (uniroot on predict); its standard error is the
#   calibration formula sqrt(s^2 / (m w0) + se(yhat(x0))^2) / |yhat'(x0)|, which for a straight line
#   is the textbook (s / |b|) sqrt(1/m + 1/n + (y0 - ybar)^2 / (b^2 Sxx)), computed here in that
#   closed form for the straight line;
# - inverse interval: the x where y0 meets the prediction band of the mean of m readings,
#   (yhat(x) - y0)^2 = t^2 (s^2 / (m w0) + se(yhat(x))^2) with se from predict(se.fit = TRUE),
#   solved by uniroot on each side of x0 (Fieller-type; for m = 1 the band is predict's own).

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

fit_summary <- function(case, fit) {
  s <- summary(fit)
  put(case, "coef", coef(fit))
  put(case, "se", s$coefficients[, 2])
  put(case, "sigma", s$sigma)
  put(case, "df", fit$df.residual)
  put(case, "r2", s$r.squared)
  put(case, "adjr2", s$adj.r.squared)
  put(case, "cor", as.vector(t(cov2cor(vcov(fit)))))
}

bands <- function(case, fit, newdata, w0 = rep(1, nrow(newdata))) {
  conf <- predict(fit, newdata, interval = "confidence", level = level, se.fit = TRUE)
  pred <- predict(fit, newdata, interval = "prediction", level = level, weights = w0)
  put(case, "band_fit", conf$fit[, "fit"])
  put(case, "band_se", conf$se.fit)
  put(case, "conf_lwr", conf$fit[, "lwr"])
  put(case, "conf_upr", conf$fit[, "upr"])
  put(case, "pred_lwr", pred[, "lwr"])
  put(case, "pred_upr", pred[, "upr"])
}

# Inverse prediction on a curve of one input x: x0, its calibration-formula SE, and the inverse
# interval from the band of the mean of m new readings of weight w0 each.
inverse <- function(case, fit, make, slope, y0s, lo, hi, m = 1, w0 = 1, tag = "inv") {
  s2 <- summary(fit)$sigma^2
  df <- fit$df.residual
  tc <- qt(1 - (1 - level) / 2, df)
  tol <- (hi - lo) * 1e-15
  out <- NULL
  for (y0 in y0s) {
    f <- function(x) predict(fit, make(x)) - y0
    x0 <- uniroot(f, c(lo, hi), tol = tol, maxiter = 2000)$root
    se0 <- predict(fit, make(x0), se.fit = TRUE)$se.fit
    sx0 <- sqrt(s2 / (m * w0) + se0^2) / abs(slope(x0))
    band <- function(x) {
      p <- predict(fit, make(x), se.fit = TRUE)
      (p$fit - y0)^2 - tc^2 * (s2 / (m * w0) + p$se.fit^2)
    }
    low <- uniroot(band, c(lo, x0), tol = tol, maxiter = 2000)$root
    high <- uniroot(band, c(x0, hi), tol = tol, maxiter = 2000)$root
    out <- rbind(out, c(y0, x0, sx0, min(low, high), max(low, high)))
  }
  for (j in 1:5) {
    put(case, paste0(tag, c("_y0", "_x0", "_se", "_lwr", "_upr")[j]), out[, j])
  }
}

# ---- NIST StRD Pontius (load cell): the certified quadratic, on a centred and scaled load ------
lines <- readLines(file.path("..", "shared", "reference", "nist-strd", "linear", "Pontius.dat"))
range <- as.integer(regmatches(lines[1:10], regexpr("[0-9]+ to [0-9]+", lines[1:10]))[2] |> strsplit(" to ") |> unlist())
data <- read.table(text = lines[range[1]:range[2]], col.names = c("y", "x"))
cx <- mean(data$x)
sx <- sd(data$x)
data$z <- (data$x - cx) / sx
pontius <- lm(y ~ z + I(z^2), data = data)
make <- function(x) data.frame(z = (x - cx) / sx)
points <- c(150000, 1000000, 1750000, 2999000)
bands("pontius", pontius, make(points))
a <- coef(pontius)
put("pontius", "sens_x", points)
slope <- function(x) (a[2] + 2 * a[3] * (x - cx) / sx) / sx
put("pontius", "sens", slope(points))
sens_se <- sapply(points, function(x) {
  g <- c(0, 1 / sx, 2 * (x - cx) / sx^2)
  sqrt(drop(t(g) %*% vcov(pontius) %*% g))
})
put("pontius", "sens_se", sens_se)
put("pontius", "band_x", points)
inverse("pontius", pontius, make, slope, c(0.5, 1.2, 2.0), min(data$x), max(data$x))

# ---- An invented 4-20 mA pressure transmitter, 0 ... 1000 kPa, up and down --------------------
set.seed(20261201)
p <- rep(c(seq(0, 1000, by = 100), seq(1000, 0, by = -100)))
ma <- round(4 + 0.016 * p + 2e-7 * p * (1000 - p) / 100 + rnorm(length(p), sd = 0.004), 4)
sweep <- data.frame(pressure_kPa = p, output_mA = ma)
write.csv(sweep, file.path(here, "transmitter-sweep.csv"), row.names = FALSE, quote = FALSE)
line <- lm(output_mA ~ pressure_kPa, data = sweep)
fit_summary("line", line)
make <- function(x) data.frame(pressure_kPa = x)
points <- c(0, 250, 500, 1000)
put("line", "band_x", points)
bands("line", line, make(points))
b <- coef(line)
inverse("line", line, make, function(x) b[2], c(12.000, 4.100, 19.900), 0, 1000)
inverse("line", line, make, function(x) b[2], c(12.000), 0, 1000, m = 3, tag = "inv3")
# The textbook calibration formula for the straight line, in closed form (m = 1 and m = 3).
n <- nrow(sweep)
s <- summary(line)$sigma
sxx <- sum((sweep$pressure_kPa - mean(sweep$pressure_kPa))^2)
for (m in c(1, 3)) {
  put("line", paste0("textbook_se_m", m), (s / abs(b[2])) * sqrt(1 / m + 1 / n + (12 - mean(sweep$output_mA))^2 / (b[2]^2 * sxx)))
}

# The same sweep weighted by the rule u = 0.002 + 0.0005 |y| (mA).
u <- 0.002 + 0.0005 * abs(sweep$output_mA)
weighted <- lm(output_mA ~ pressure_kPa, data = sweep, weights = 1 / u^2)
fit_summary("weighted", weighted)
put("weighted", "band_x", points)
u0 <- 0.002 + 0.0005 * 12
put("weighted", "u0", u0)
bands("weighted", weighted, make(points), w0 = rep(1 / u0^2, length(points)))
bw <- coef(weighted)
inverse("weighted", weighted, make, function(x) bw[2], c(12.000), 0, 1000, w0 = 1 / u0^2)
put("weighted", "wres", weighted.residuals(weighted))
put("weighted", "res", residuals(weighted))

# ---- An invented pressure sensor over pressure and temperature: a polynomial surface --------
set.seed(20261202)
grid <- expand.grid(pressure_kPa = seq(0, 1000, by = 125), temp_C = c(-20, 5, 30, 55, 80))
grid$output_mV <- with(grid, round(1.5 + 0.02 * pressure_kPa + 0.004 * temp_C - 3e-6 * pressure_kPa^2
                                   + 2e-6 * pressure_kPa * temp_C + rnorm(nrow(grid), sd = 0.01), 4))
write.csv(grid, file.path(here, "surface-sweep.csv"), row.names = FALSE, quote = FALSE)
surface <- lm(output_mV ~ pressure_kPa + temp_C + I(pressure_kPa^2) + I(pressure_kPa * temp_C), data = grid)
fit_summary("surface", surface)
at <- data.frame(pressure_kPa = c(100, 500, 900), temp_C = c(-10, 25, 70))
put("surface", "band_x1", at$pressure_kPa)
put("surface", "band_x2", at$temp_C)
bands("surface", surface, at)
cs <- coef(surface)
put("surface", "sens", cs[2] + 2 * cs[4] * at$pressure_kPa + cs[5] * at$temp_C)
put("surface", "sens_se", sapply(seq_len(nrow(at)), function(i) {
  g <- c(0, 1, 0, 2 * at$pressure_kPa[i], at$temp_C[i])
  sqrt(drop(t(g) %*% vcov(surface) %*% g))
}))
make <- function(x) data.frame(pressure_kPa = x, temp_C = 25)
inverse("surface", surface, make, function(x) cs[2] + 2 * cs[4] * x + cs[5] * 25, c(10.0), 0, 1000)

# ---- An invented 10 kohm NTC thermistor: Steinhart-Hart, 1/T on ln R and (ln R)^3 -----------
set.seed(20261203)
temp_K <- 273.15 + seq(-20, 100, by = 5)
abc <- c(1.129148e-3, 2.34125e-4, 8.76741e-8)
resistance <- sapply(temp_K, function(tk) uniroot(function(r) abc[1] + abc[2] * log(r) + abc[3] * log(r)^3 - 1 / tk,
                                                   c(10, 1e7), tol = 1e-12)$root)
ntc <- data.frame(r_ohm = signif(resistance * (1 + rnorm(length(resistance), sd = 2e-4)), 7), temp_K = temp_K)
write.csv(ntc, file.path(here, "thermistor-sweep.csv"), row.names = FALSE, quote = FALSE)
sh <- lm(I(1 / temp_K) ~ log(r_ohm) + I(log(r_ohm)^3), data = ntc)
fit_summary("thermistor", sh)
points <- c(2000, 10000, 50000)
put("thermistor", "band_x", points)
make <- function(x) data.frame(r_ohm = x)
bands("thermistor", sh, make(points))
ch <- coef(sh)
slope <- function(x) (ch[2] + 3 * ch[3] * log(x)^2) / x
put("thermistor", "sens", slope(points))
inverse("thermistor", sh, make, slope, c(1 / 298.15), min(ntc$r_ohm), max(ntc$r_ohm))

# The same thermistor weighted by a reference uncertainty of 0.01 K + 0.0001 T: the response is
# 1/T, so its uncertainty is u(T) / T^2 (delta method) and its weight T^4 / u(T)^2.
ut <- 0.01 + 0.0001 * ntc$temp_K
shw <- lm(I(1 / temp_K) ~ log(r_ohm) + I(log(r_ohm)^3), data = ntc, weights = ntc$temp_K^4 / ut^2)
fit_summary("thermistor_weighted", shw)

# ---- An invented Pt100 over 0 ... 400 C: Callendar-Van Dusen, trade coefficients by the delta method
set.seed(20261204)
t <- seq(0, 400, by = 20)
pt <- data.frame(temp_C = t, r_ohm = round(100 * (1 + 3.9083e-3 * t - 5.775e-7 * t^2) + rnorm(length(t), sd = 0.002), 4))
write.csv(pt, file.path(here, "pt100-sweep.csv"), row.names = FALSE, quote = FALSE)
cvd <- lm(r_ohm ~ temp_C + I(temp_C^2), data = pt)
fit_summary("pt100", cvd)
est <- coef(cvd)
cov <- vcov(cvd)
put("pt100", "derived", c(est[1], est[2] / est[1], est[3] / est[1], (est[2] + 100 * est[3]) / est[1]))
put("pt100", "derived_se", c(
  msm::deltamethod(~ x1, est, cov),
  msm::deltamethod(~ x2 / x1, est, cov),
  msm::deltamethod(~ x3 / x1, est, cov),
  msm::deltamethod(~ (x2 + 100 * x3) / x1, est, cov)))

header <- c(
  paste0("# produced by curve_reference.R (beside this file) with ", R.version.string,
         ", msm ", as.character(packageVersion("msm"))),
  "# case,quantity,index,value")
writeLines(c(header, unlist(rows)), file.path(here, "curve-reference.csv"))
