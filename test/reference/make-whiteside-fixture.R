#!/usr/bin/Rscript
# Reference fixture on real data: one house's weekly gas use before and after
# cavity-wall insulation, fitted and projected by R.
#
# Rerun from the repository root with Debian's R (r-base-core) and its
# r-cran-mass package:
#
#     Rscript test/reference/make-whiteside-fixture.R
#
# It rewrites test/reference/whiteside-fixture.json. The committed fixture was
# made with R 4.2.2 and MASS 7.3-58.2 (Debian 12 packages r-base-core and
# r-cran-mass); the versions actually used are also written into the
# fixture's "generator" field. Only base R, stats and MASS are used (no JSON
# package: a small writer below prints every double so that it reads back
# exactly).
#
# The data: `whiteside` in MASS (Venables and Ripley, Modern Applied
# Statistics with S, 4th edition, Springer 2002, section 6.1; originally Hand
# et al., A Handbook of Small Data Sets, Chapman & Hall 1993, p. 69). 26 weeks
# before and 30 weeks after the insulation, each row a week's mean outside
# temperature `Temp` (degrees Celsius) and that week's gas consumption `Gas`
# (1000s of cubic feet). The rows are sorted by temperature within each group,
# so their order is not time order; the weeks carry no dates.
#
# How the engine sees the data (the test builds its Period objects this way):
#   every week is a period of days = 7, quantity = Gas (1000 ft3 per week),
#   usePerDay = Gas / 7 (1000 ft3 per day), meanTemp = Temp.
# The engine fits use per day by least squares weighted by days. With every
# weight 7 that is R's ordinary lm(Gas ~ Temp) rescaled:
#   per-day coefficients and their standard errors = R's / 7 (t values equal),
#   per-day residual variance sigma2_day = sum(7 * (Gas/7 - fit/7)^2) / (n - p)
#                                        = sigma_R^2 / 7,
#   a week's model baseline 7 * f(Temp) = R's predict() for that week,
#   savings = sum of predictions over the After weeks - sum of After Gas.
# The engine's exact savings variance, with c = sum of days_j * x_j over the
# reporting weeks and (X'WX)^-1 its unscaled covariance,
#   sigma2_day * (c' (X'WX)^-1 c + sum of days_j),
# equals, in R's own terms, c0' vcov(fit) c0 + m * sigma_R^2 with c0 the sum of
# the After design rows [1, Temp] and m the number of After weeks: the variance
# of the summed predictions plus m independent new weeks' noise. The script
# computes it both ways and stops if they differ.

library(MASS)
suppressWarnings(library(stats))

DAYS_PER_WEEK <- 7
CONFIDENCES <- c(0.68, 0.90)
MIN_POINTS_PER_SEGMENT <- 3 # the engine's default minimum of points in every segment

stopifnot(identical(levels(whiteside$Insul), c("Before", "After")))
before <- subset(whiteside, Insul == "Before")
after <- subset(whiteside, Insul == "After")
n <- nrow(before)
m <- nrow(after)

# ---- the Before fit (2P: Gas = b0 + b1 * Temp) -------------------------------
fit <- lm(Gas ~ Temp, data = before)
s <- summary(fit)
coefs <- coef(s)
sigma <- s$sigma
df_resid <- fit$df.residual
V <- vcov(fit)

# The same fit as the engine states it: use per day, weighted by days.
fit_day <- lm(I(Gas / DAYS_PER_WEEK) ~ Temp, data = before, weights = rep(DAYS_PER_WEEK, n))
s_day <- summary(fit_day)
close <- function(a, b, tol = 1e-12) all(abs(a - b) <= tol * pmax(abs(a), abs(b), 1e-300))
stopifnot(close(coef(fit_day), coef(fit) / DAYS_PER_WEEK))
stopifnot(close(coef(s_day)[, 2], coefs[, 2] / DAYS_PER_WEEK))
stopifnot(close(s_day$sigma^2, sigma^2 / DAYS_PER_WEEK))

# ---- the projection onto the After weeks ------------------------------------
pred <- predict(fit, newdata = after, se.fit = TRUE)
prediction_half_width <- sapply(CONFIDENCES, function(level) {
  p <- predict(fit, newdata = after, interval = "prediction", level = level)
  p[, "upr"] - p[, "fit"]
})
sum_pred <- sum(pred$fit)
sum_gas <- sum(after$Gas)
savings <- sum_pred - sum_gas

c0 <- c(m, sum(after$Temp)) # sum of the After design rows [1, Temp]
var_sum_pred <- drop(t(c0) %*% V %*% c0)
# R's own check of that: m times the prediction at the mean After temperature.
se_mean_row <- predict(fit, newdata = data.frame(Temp = mean(after$Temp)), se.fit = TRUE)$se.fit
stopifnot(close(sqrt(var_sum_pred), m * se_mean_row))
exact_variance <- var_sum_pred + m * sigma^2

# The same variance computed the engine's way, in per-day units.
X <- model.matrix(fit)
XtWX_inv <- solve(t(X) %*% (DAYS_PER_WEEK * X))
c_days <- DAYS_PER_WEEK * c0
exact_variance_engine_form <- s_day$sigma^2 * (drop(t(c_days) %*% XtWX_inv %*% c_days) + DAYS_PER_WEEK * m)
stopifnot(close(exact_variance, exact_variance_engine_form, 1e-10))

bands <- lapply(CONFIDENCES, function(level) {
  t_crit <- qt(1 - (1 - level) / 2, df_resid)
  list(confidence = level, tCritical = t_crit, halfWidth = t_crit * sqrt(exact_variance))
})

# ---- residual diagnostics in row order ---------------------------------------
r <- residuals(fit) # energy residuals: Gas - predicted Gas, per week
lag1 <- sum(r[-1] * r[-n]) / sum(r^2)
lag1_acf <- acf(r, lag.max = 1, plot = FALSE)$acf[2]
durbin_watson <- sum(diff(r)^2) / sum(r^2)
sorted_by_temperature <- !is.unsorted(before$Temp) && !is.unsorted(after$Temp)

# ---- is a straight line the right shape? -------------------------------------
# (a) Venables and Ripley's own check: a quadratic term in Temp.
quad <- coef(summary(lm(Gas ~ Temp + I(Temp^2), data = before)))

# (b) Changepoint alternatives, profiled exactly over the changepoint c: on
# every interval between neighbouring distinct temperatures the SSE is smooth
# in c, so optimize() finds its minimum there; data points are tried as well.
# c is admissible where at least MIN_POINTS_PER_SEGMENT weeks lie on each side
# (a week on c counting on both), as the engine requires.
sorted_temp <- sort(before$Temp)
lowest_c <- sorted_temp[MIN_POINTS_PER_SEGMENT]
highest_c <- sorted_temp[n - MIN_POINTS_PER_SEGMENT + 1]
profile_changepoint <- function(sse_at) {
  knots <- unique(c(lowest_c, sorted_temp[sorted_temp > lowest_c & sorted_temp < highest_c], highest_c))
  best <- list(c = knots[1], sse = sse_at(knots[1]))
  for (k in knots) {
    v <- sse_at(k)
    if (v < best$sse) best <- list(c = k, sse = v)
  }
  for (i in seq_len(length(knots) - 1)) {
    o <- optimize(sse_at, c(knots[i], knots[i + 1]), tol = 1e-12)
    if (o$objective < best$sse) best <- list(c = o$minimum, sse = o$objective)
  }
  best
}
hinge_fit <- function(cp) lm(Gas ~ I(pmax(cp - Temp, 0)), data = before)
broken_fit <- function(cp) lm(Gas ~ I(pmax(cp - Temp, 0)) + I(pmax(Temp - cp, 0)), data = before)
hinge <- profile_changepoint(function(cp) deviance(hinge_fit(cp)))
broken <- profile_changepoint(function(cp) deviance(broken_fit(cp)))
# The SSE is flat at its minimum, so optimize() places c only to about 1e-8.
# When the broken line's c falls between two weeks, the two segments are the
# separate least-squares lines of the weeks on either side, meeting at c
# (Hudson 1966, JASA 61:1097-1129): their intersection gives c exactly.
broken_exact <- local({
  left <- before$Temp < broken$c
  a <- coef(lm(Gas ~ Temp, data = before[left, ]))
  b <- coef(lm(Gas ~ Temp, data = before[!left, ]))
  cp <- unname((b[1] - a[1]) / (a[2] - b[2]))
  inside <- max(before$Temp[left]) < cp && cp < min(before$Temp[!left])
  if (inside && deviance(broken_fit(cp)) <= broken$sse * (1 + 1e-12)) cp else NA_real_
})
stopifnot(is.na(broken_exact) || abs(broken_exact - broken$c) < 1e-6)
hinge_summary <- summary(hinge_fit(hinge$c))
hinge_coefs <- coef(hinge_summary)
# lm() holds c fixed and leaves n - 2 residual df; the engine counts the
# changepoint as a parameter (sigma^2 = SSE / (n - 3)), so its standard errors
# are these on n - 3 df.
hinge_se_changepoint_counted <- sqrt(hinge$sse / (n - 3) * diag(hinge_summary$cov.unscaled))
sse_line <- deviance(fit)
# Extra-sum-of-squares F against the straight line, the changepoint counted as
# a parameter (3 and 4 parameters against 2); a negative F means the
# alternative fits worse than the line anywhere in the admissible range.
f_against_line <- function(sse, p) ((sse_line - sse) / (p - 2)) / (sse / (n - p))
broken_coefs <- coef(broken_fit(if (is.na(broken_exact)) broken$c else broken_exact))

# ---- JSON, written by hand -----------------------------------------------------
number <- function(x) {
  if (!is.finite(x)) stop("non-finite number in the fixture")
  for (digits in 15:17) {
    text <- formatC(x, digits = digits, format = "g")
    if (as.numeric(text) == x) return(sub("^\\s+", "", text))
  }
  stop("no exact decimal form")
}
scalar <- function(v) !is.list(v) && length(v) == 1
json <- function(x, indent = "") {
  inner <- paste0(indent, " ")
  if (is.list(x) && length(x) > 0 && all(vapply(x, scalar, TRUE))) {
    # A short record or a list of numbers goes on one line.
    items <- vapply(x, json, "")
    if (is.null(names(x))) return(paste0("[", paste(items, collapse = ", "), "]"))
    return(paste0("{", paste0('"', names(x), '": ', items, collapse = ", "), "}"))
  }
  if (is.list(x) && !is.null(names(x))) {
    items <- mapply(function(k, v) paste0(inner, '"', k, '": ', json(v, inner)), names(x), x)
    return(paste0("{\n", paste(items, collapse = ",\n"), "\n", indent, "}"))
  }
  if (is.list(x)) {
    items <- vapply(x, function(v) paste0(inner, json(v, inner)), "")
    return(paste0("[\n", paste(items, collapse = ",\n"), "\n", indent, "]"))
  }
  if (length(x) != 1) stop("wrap vectors in as.list()")
  if (is.na(x)) return("null")
  if (is.logical(x)) return(if (x) "true" else "false")
  if (is.character(x)) return(paste0('"', gsub('(["\\\\])', "\\\\\\1", x), '"'))
  number(unname(x))
}

rows <- lapply(seq_len(nrow(whiteside)), function(i) {
  list(insul = as.character(whiteside$Insul[i]), temp = whiteside$Temp[i], gas = whiteside$Gas[i])
})
after_weeks <- lapply(seq_len(m), function(j) {
  list(
    temp = after$Temp[j], gas = after$Gas[j], fit = unname(pred$fit[j]), seFit = unname(pred$se.fit[j]),
    predictionHalfWidth68 = unname(prediction_half_width[j, 1]),
    predictionHalfWidth90 = unname(prediction_half_width[j, 2])
  )
})

out <- list(
  generator = list(
    script = "test/reference/make-whiteside-fixture.R",
    R = R.version.string,
    MASS = packageDescription("MASS")$Version,
    data = "MASS::whiteside (Venables and Ripley, Modern Applied Statistics with S, 4th ed., section 6.1)"
  ),
  units = list(
    temp = "weekly mean outside temperature, degrees Celsius",
    gas = "gas used in the week, 1000s of cubic feet",
    engine = "each week a period of 7 days: quantity = gas, usePerDay = gas / 7, meanTemp = temp"
  ),
  rowsSortedByTemperature = sorted_by_temperature,
  rows = rows,
  before = list(
    n = n,
    coefficients = as.list(unname(coefs[, "Estimate"])),
    standardErrors = as.list(unname(coefs[, "Std. Error"])),
    tValues = as.list(unname(coefs[, "t value"])),
    residualStandardError = sigma,
    dfResidual = df_resid,
    sse = sse_line,
    rSquared = s$r.squared,
    vcov = list(as.list(unname(V[1, ])), as.list(unname(V[2, ]))),
    perDay = list(
      note = "lm(I(Gas / 7) ~ Temp, weights = 7): the fit as the engine states it",
      coefficients = as.list(unname(coef(fit_day))),
      standardErrors = as.list(unname(coef(s_day)[, "Std. Error"])),
      residualVariance = s_day$sigma^2
    ),
    residualsInRowOrder = list(
      lag1Autocorrelation = lag1,
      lag1AutocorrelationAcf = lag1_acf,
      durbinWatson = durbin_watson
    )
  ),
  after = list(
    m = m,
    weeks = after_weeks,
    sumPredictions = sum_pred,
    sumGas = sum_gas,
    savings = savings,
    sumPredictionsStandardError = sqrt(var_sum_pred),
    exactSavingsVariance = exact_variance,
    exactSavingsVarianceEngineForm = exact_variance_engine_form,
    bands = bands
  ),
  shapeCheck = list(
    note = "alternatives to the straight line on the Before weeks; F against the line counts the changepoint as a parameter",
    quadratic = list(
      term = "I(Temp^2)",
      estimate = quad[3, "Estimate"], standardError = quad[3, "Std. Error"],
      tValue = quad[3, "t value"], pValue = quad[3, "Pr(>|t|)"]
    ),
    admissibleChangepoints = as.list(c(lowest_c, highest_c)),
    heatingHinge = list(
      model = "Gas ~ pmax(c - Temp, 0) (3PH)",
      changepoint = hinge$c, sse = hinge$sse,
      coefficients = as.list(unname(hinge_coefs[, "Estimate"])),
      standardErrors = as.list(unname(hinge_coefs[, "Std. Error"])),
      standardErrorsChangepointCounted = as.list(unname(hinge_se_changepoint_counted)),
      fAgainstLine = f_against_line(hinge$sse, 3),
      fCritical05 = qf(0.95, 1, n - 3)
    ),
    brokenLine = list(
      model = "Gas ~ pmax(c - Temp, 0) + pmax(Temp - c, 0) (4P)",
      changepoint = broken$c, sse = broken$sse,
      changepointByIntersection = broken_exact, # null when the optimum sits on a week
      slopeBelow = -unname(broken_coefs[2]), slopeAbove = unname(broken_coefs[3]),
      fAgainstLine = f_against_line(broken$sse, 4),
      fCritical05 = qf(0.95, 2, n - 4)
    )
  )
)

path <- file.path("test", "reference", "whiteside-fixture.json")
if (!dir.exists(dirname(path))) stop("run from the repository root")
writeLines(json(out), path)
cat("wrote", path, file.size(path), "bytes\n")
