# Reference values for StandFit's jackknife and bootstrap intervals, from R's boot package, on the
# SAME resamples StandFit's generator drew (line-indices.csv, law-indices.csv: 0-based point
# indices, one resample per row, written by `dotnet run --project bench/StandFit.Benchmarks --
# fixture tests/StandFit.Tests/Resampling/Fixtures`). Run once, from this folder:
#   Rscript boot_reference.R > boot-reference.csv
# The output is committed; CI never runs R.
suppressPackageStartupMessages(library(boot))

emit <- function(name, value) cat(sprintf("%s,%.17g\n", name, value))

cat(sprintf("# %s; boot %s\n", R.version.string, as.character(packageVersion("boot"))))
cat("name,value\n")

# boot() draws its own resamples; t is then replaced by the statistic on StandFit's resamples, so
# that boot.ci works on exactly the replicates StandFit computed. L (for BCa) is given explicitly:
# the jackknife influence values of Efron and Tibshirani (1993, eq. 14.15), (n - 1)(theta_dot -
# theta_(i)). boot's empinf(type = "jack") gives (n - 1)(t0 - theta_(i)), centred on t0 instead of
# on the mean of the leave-one-out estimates; subtracting its mean turns it into the former.
on.indices <- function(data, statistic, indices) {
    set.seed(1)
    b <- boot(data, statistic, R = nrow(indices))
    b$t <- t(apply(indices, 1, function(i) statistic(data, i + 1)))
    if (ncol(b$t) != length(b$t0)) b$t <- t(b$t)
    b
}

report <- function(prefix, b, index) {
    L <- empinf(b, index = index, type = "jack")
    L <- L - mean(L)
    n <- nrow(b$data)
    emit(paste0(prefix, ".estimate"), b$t0[index])
    emit(paste0(prefix, ".boot_se"), sd(b$t[, index]))
    emit(paste0(prefix, ".boot_bias"), mean(b$t[, index]) - b$t0[index])
    emit(paste0(prefix, ".jack_se"), sqrt(sum(L^2) / (n * (n - 1))))
    emit(paste0(prefix, ".acceleration"), sum(L^3) / (6 * sum(L^2)^1.5))
    for (i in seq_along(L)) emit(sprintf("%s.influence.%d", prefix, i - 1), L[i])
    for (conf in c(0.95, 0.6827)) {
        ci <- boot.ci(b, conf = conf, type = c("perc", "basic", "bca"), index = index, L = L)
        tag <- sprintf("%s.%g", prefix, conf)
        emit(paste0(tag, ".perc.low"), ci$percent[4]); emit(paste0(tag, ".perc.high"), ci$percent[5])
        emit(paste0(tag, ".basic.low"), ci$basic[4]); emit(paste0(tag, ".basic.high"), ci$basic[5])
        emit(paste0(tag, ".bca.low"), ci$bca[4]); emit(paste0(tag, ".bca.high"), ci$bca[5])
    }
}

# A simulated 21-point straight line: offset and gain by lm (LINPACK QR).
line <- read.csv("line.csv")
line.idx <- as.matrix(read.csv("line-indices.csv", header = FALSE))
coefs <- function(d, i) coef(lm(y ~ x, data = d[i, ]))
b <- on.indices(line, coefs, line.idx)
report("line.offset", b, 1)
report("line.gain", b, 2)
# The delete-one jackknife directly: bias-corrected estimate and bias of the gain.
loo <- sapply(seq_len(nrow(line)), function(i) coef(lm(y ~ x, data = line[-i, ]))[2])
n <- nrow(line)
emit("line.gain.jack_mean", mean(loo))
emit("line.gain.jack_bias", (n - 1) * (mean(loo) - b$t0[2]))
emit("line.gain.jack_corrected", n * b$t0[2] - (n - 1) * mean(loo))

# Law school data, Efron and Tibshirani (1993) Table 3.1: the correlation of LSAT and GPA.
law <- data.frame(
    lsat = c(576, 635, 558, 578, 666, 580, 555, 661, 651, 605, 653, 575, 545, 572, 594),
    gpa = c(3.39, 3.30, 2.81, 3.03, 3.44, 3.07, 3.00, 3.43, 3.36, 3.13, 3.12, 2.74, 2.76, 2.88, 2.96))
law.idx <- as.matrix(read.csv("law-indices.csv", header = FALSE))
correlation <- function(d, i) cor(d$lsat[i], d$gpa[i])
report("law.cor", on.indices(law, correlation, law.idx), 1)
