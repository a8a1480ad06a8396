# Reference values for tests/analysis/paired-effect.test.ts, computed once with R 4.2.2,
# nlme 3.1-162, emmeans 1.8.4 and numDeriv 2016.8-1.1 (Debian bookworm packages r-base-core,
# r-cran-nlme, r-cran-emmeans). Run: Rscript tests/analysis/reference/paired-effect.R
# The model: y ~ batch + group, a residual SD per group (varIdent), REML; the Satterthwaite df of
# the group contrast from the inverse Hessian of nlme's REML log-likelihood (numDeriv) and the
# Jacobian of its variance, both in (log variance ratio, log sigma).
suppressMessages({ library(nlme); library(emmeans); library(numDeriv) })
reference <- function(d) {
  m <- gls(y ~ batch + group, data = d, weights = varIdent(form = ~ 1 | group), method = "REML")
  ratio <- coef(m$modelStruct$varStruct, unconstrained = FALSE)
  fixedFit <- function(th) gls(y ~ batch + group, data = d, method = "REML",
    weights = varIdent(form = ~ 1 | group, fixed = setNames(exp(th[1]), names(ratio))),
    control = glsControl(sigma = exp(th[2])))
  ll <- function(th) as.numeric(logLik(fixedFit(th), REML = TRUE))
  v <- function(th) vcov(fixedFit(th))["groupv", "groupv"]
  th0 <- unname(c(log(ratio), log(m$sigma)))
  a <- solve(-hessian(ll, th0)); g <- jacobian(v, th0)
  sds <- c(m$sigma, m$sigma * ratio); names(sds) <- c(setdiff(levels(d$group), names(ratio)), names(ratio))
  e <- as.data.frame(summary(pairs(emmeans(m, ~ group, mode = "satterthwaite", data = d), reverse = TRUE)))
  cat(sprintf("estimate %.12g\nse %.12g\nsd v %.12g\nsd w %.12g\ndf (numDeriv) %.12g\ndf (emmeans) %.12g\n",
    coef(m)[["groupv"]], sqrt(vcov(m)["groupv", "groupv"]), sds[["v"]], sds[["w"]],
    2 * v(th0)^2 / (g %*% a %*% t(g)), e$df))
}
# Design 1: three batches with the variant (3, 2, 1 units), one batch of WT only.
cat("design 1\n")
reference(data.frame(
  y = c(1.0, 1.2, 1.35, 0.5, 0.7, 0.62, 2.0, 1.5, 1.4, 1.6, 1.3, 1.45, 0.9, 0.2, 0.35, 0.8, 0.95, 0.9),
  batch = factor(c(rep("A", 6), rep("B", 6), rep("C", 3), rep("D", 3))),
  group = factor(c(rep("v", 3), rep("w", 3), rep("v", 2), rep("w", 4), "v", "w", "w", "w", "w", "w"), levels = c("w", "v"))))
# Design 2: one variant unit in each of three batches (its variance rests on the batch differences).
cat("design 2\n")
reference(data.frame(
  y = c(0.31, 0.02, -0.05, 0.04, 0.52, 0.21, 0.18, 0.27, 0.05, -0.12, -0.2, -0.15),
  batch = factor(c(rep("A", 4), rep("B", 4), rep("C", 4))),
  group = factor(rep(c("v", "w", "w", "w"), 3), levels = c("w", "v"))))
