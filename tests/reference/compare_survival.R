# compare_survival.R DIR — recomputes every number in DIR/budledger.csv from
# DIR/data.csv with R's survival package (survfit, survdiff, coxph, survreg)
# and, for Gompertz, a direct maximisation written here (optim, then Newton
# steps on the full two-parameter likelihood), and compares them.
#
# Agreement: |ours - R| <= 1e-8 * max(|ours|, |R|) + 1e-11. The absolute term
# only matters for quantities that are differences of sums and sit at zero
# (observed - expected, chi-square, a Gompertz rate, a Cox coefficient at 0),
# where rounding in either program is all that is left. Documented convention
# differences (docs/statistics.md) are applied before comparing:
#  - Weibull fits use lifespans > 0 (survreg refuses 0);
#  - R's coxph and survreg run with tighter convergence than their defaults,
#    so that both programs report the converged maximum;
#  - a fit or test R cannot compute (error, non-convergence, infinite
#    coefficient) must be reported as not estimable / not defined by BudLedger.
# Exits 1 on any disagreement.
suppressPackageStartupMessages(library(survival))

args <- commandArgs(trailingOnly = TRUE)
dir <- args[1]
data <- read.csv(file.path(dir, "data.csv"), stringsAsFactors = FALSE)
ours <- read.csv(file.path(dir, "budledger.csv"), stringsAsFactors = FALSE,
                 colClasses = c("integer", "character", "character"))
ours$value <- suppressWarnings(as.numeric(ours$value))

fmt <- function(x) sprintf("%g", x)
nafix <- function(x) ifelse(is.finite(x), x, NA)

curve_keys <- function(d) {
  out <- c()
  groups <- sort(unique(d$group))
  fits <- list(); fitsll <- list()
  for (g in groups) {
    dg <- d[d$group == g, ]
    fits[[g]] <- survfit(Surv(time, status) ~ 1, data = dg, conf.type = "log")
    fitsll[[g]] <- survfit(Surv(time, status) ~ 1, data = dg, conf.type = "log-log")
  }
  tau <- max(sapply(fits, function(f) max(f$time)))
  for (g in groups) {
    f <- fits[[g]]; fl <- fitsll[[g]]
    k <- paste0("km/", g, "/", f$time)
    out[paste0(k, "/n.risk")] <- f$n.risk
    out[paste0(k, "/n.event")] <- f$n.event
    out[paste0(k, "/n.censor")] <- f$n.censor
    out[paste0(k, "/surv")] <- f$surv
    out[paste0(k, "/std.err")] <- nafix(f$surv * f$std.err)
    out[paste0(k, "/log.lower")] <- nafix(f$lower)
    out[paste0(k, "/log.upper")] <- nafix(f$upper)
    out[paste0(k, "/loglog.lower")] <- nafix(fl$lower)
    out[paste0(k, "/loglog.upper")] <- nafix(fl$upper)
    for (type in c("log", "loglog")) {
      q <- quantile(if (type == "log") f else fl, probs = c(0.25, 0.5, 0.75))
      for (i in 1:3) {
        k <- paste0("quantile/", type, "/", g, "/", fmt(c(0.25, 0.5, 0.75)[i]))
        out[paste0(k, "/est")] <- q$quantile[i]
        out[paste0(k, "/lower")] <- q$lower[i]
        out[paste0(k, "/upper")] <- q$upper[i]
      }
    }
    tab <- summary(f, rmean = tau)$table
    out[paste0("rmean/", g, "/mean")] <- tab[["rmean"]]
    out[paste0("rmean/", g, "/se")] <- tab[["se(rmean)"]]
  }
  out
}

logrank_keys <- function(d, strat, rho) {
  out <- c()
  k <- paste0("logrank/", if (strat) "strata" else "none", "/rho", fmt(rho))
  groups <- sort(unique(d$group))
  st <- if (strat) d$stratum else rep(1, nrow(d))
  fit <- survival:::survdiff.fit(Surv(d$time, d$status), factor(d$group, levels = groups),
                                 st, rho)
  o <- if (is.matrix(fit$observed)) rowSums(fit$observed) else fit$observed
  e <- if (is.matrix(fit$expected)) rowSums(fit$expected) else fit$expected
  for (i in seq_along(groups)) {
    out[paste0(k, "/obs/", groups[i])] <- o[i]
    out[paste0(k, "/exp/", groups[i])] <- e[i]
    for (j in seq_along(groups)) out[paste0(k, "/var/", groups[i], "/", groups[j])] <- fit$var[i, j]
  }
  form <- if (strat) Surv(time, status) ~ group + strata(stratum) else Surv(time, status) ~ group
  sd <- tryCatch(survdiff(form, data = d, rho = rho), error = function(e) NULL)
  df <- sum(e > 0) - 1
  defined <- !is.null(sd) && df >= 1
  out[paste0(k, "/defined")] <- as.numeric(defined)
  if (defined) {
    out[paste0(k, "/chisq")] <- sd$chisq
    out[paste0(k, "/df")] <- df
    out[paste0(k, "/p")] <- pchisq(sd$chisq, df, lower.tail = FALSE)
  }
  out
}

cox_keys <- function(d, strat) {
  out <- c()
  k <- paste0("cox/", if (strat) "strata" else "none")
  d$group <- factor(d$group, levels = sort(unique(d$group)))
  form <- if (strat) Surv(time, status) ~ group + strata(stratum) else Surv(time, status) ~ group
  warned <- FALSE
  fit <- tryCatch(withCallingHandlers(
    coxph(form, data = d, ties = "efron",
          control = coxph.control(eps = 1e-12, toler.chol = 1e-13, iter.max = 100)),
    warning = function(w) { warned <<- TRUE; invokeRestart("muffleWarning") }),
    error = function(e) NULL)
  ok <- !is.null(fit) && !warned && sum(d$status) > 0 && all(is.finite(coef(fit)))
  out[paste0(k, "/estimable")] <- as.numeric(ok)
  if (ok) {
    cf <- coef(fit); se <- sqrt(diag(fit$var))
    nm <- sub("^group", "", names(cf))
    out[paste0(k, "/coef/", nm)] <- cf
    out[paste0(k, "/se/", nm)] <- se
    out[paste0(k, "/loglik0")] <- fit$loglik[1]
    out[paste0(k, "/loglik")] <- fit$loglik[2]
    out[paste0(k, "/score")] <- fit$score
    out[paste0(k, "/wald")] <- fit$wald.test
  }
  out
}

weibull_keys <- function(dg, g) {
  out <- c()
  k <- paste0("weibull/", g)
  dp <- dg[dg$time > 0, ]
  warned <- FALSE
  fit <- NULL
  if (nrow(dp) > 0 && sum(dp$status) > 0) {
    fit <- tryCatch(withCallingHandlers(
      survreg(Surv(time, status) ~ 1, data = dp, dist = "weibull",
              control = survreg.control(rel.tolerance = 1e-13, toler.chol = 1e-15, iter.max = 200)),
      warning = function(w) { warned <<- TRUE; invokeRestart("muffleWarning") }),
      error = function(e) NULL)
  }
  # A variance matrix that is not positive definite means no proper maximum
  # (e.g. all lifespans equal: survreg returns a zero variance).
  ok <- !is.null(fit) && !warned && all(is.finite(fit$var)) &&
    all(eigen(fit$var, symmetric = TRUE, only.values = TRUE)$values > 0)
  out[paste0(k, "/estimable")] <- as.numeric(ok)
  if (ok) {
    out[paste0(k, "/intercept")] <- coef(fit)[[1]]
    out[paste0(k, "/logscale")] <- log(fit$scale)
    out[paste0(k, "/var.intercept")] <- fit$var[1, 1]
    out[paste0(k, "/var.logscale")] <- fit$var[2, 2]
    out[paste0(k, "/cov")] <- fit$var[1, 2]
    out[paste0(k, "/loglik")] <- fit$loglik[2]
  }
  out
}

# (e^x - 1)/x and the next two derivative kernels, by series near 0 where the
# closed forms cancel.
kernels <- function(x) {
  small <- abs(x) < 0.5
  xs <- ifelse(small, x, 0); xl <- ifelse(small, 1, x)
  m <- 0:30
  pw <- outer(xs, m, "^")
  f0s <- drop(pw %*% (1 / factorial(m + 1)))
  f1s <- drop(pw %*% ((m + 1) / factorial(m + 2)))
  f2s <- drop(pw %*% ((m + 2) * (m + 1) / factorial(m + 3)))
  f0l <- expm1(xl) / xl
  f1l <- (xl * exp(xl) - expm1(xl)) / xl^2
  f2l <- (xl^2 * exp(xl) - 2 * xl * exp(xl) + 2 * expm1(xl)) / xl^3
  list(f0 = ifelse(small, f0s, f0l), f1 = ifelse(small, f1s, f1l), f2 = ifelse(small, f2s, f2l))
}

gompertz_keys <- function(dg, g) {
  out <- c()
  k <- paste0("gompertz/", g)
  t <- dg$time; s <- dg$status; d <- sum(s)
  # Where no maximum exists (analytically: no deaths, every death at 0, or
  # every death at the longest lifespan) no fit is expected.
  ok <- d > 0 && sum(s * t) > 0 && sum(s * t) < d * max(t)
  if (ok) {
    ll <- function(a, b) sum(s * (log(b) + a * t)) - b * sum(t * kernels(a * t)$f0)
    # optim only needs to come close; the Newton steps below finish the job.
    nll <- function(p) -(sum(s * (p[2] + p[1] * t)) - exp(p[2]) * sum(expm1(p[1] * t)) / p[1])
    o <- optim(c(0.01, log(d / sum(t))), nll, method = "BFGS",
               control = list(reltol = 1e-16, maxit = 10000))
    a <- o$par[1]; b <- exp(o$par[2])
    for (i in 1:50) {
      kk <- kernels(a * t)
      G <- sum(t * kk$f0); G1 <- sum(t^2 * kk$f1); G2 <- sum(t^3 * kk$f2)
      grad <- c(sum(s * t) - b * G1, d / b - G)
      H <- matrix(c(-b * G2, -G1, -G1, -d / b^2), 2)
      step <- solve(H, grad)
      a <- a - step[1]; b <- b - step[2]
      if (max(abs(step) / c(max(abs(a), 1e-3), b)) < 1e-15) break
    }
    kk <- kernels(a * t)
    H <- matrix(c(b * sum(t^3 * kk$f2), sum(t^2 * kk$f1), sum(t^2 * kk$f1), d / b^2), 2)
    V <- solve(H)
    ok <- all(is.finite(c(a, b, V))) && b > 0
  }
  out[paste0(k, "/estimable")] <- as.numeric(ok)
  if (ok) {
    out[paste0(k, "/a")] <- a
    out[paste0(k, "/b")] <- b
    out[paste0(k, "/se.a")] <- sqrt(V[1, 1])
    out[paste0(k, "/se.b")] <- sqrt(V[2, 2])
    out[paste0(k, "/loglik")] <- ll(a, b)
  }
  out
}

r_keys <- function(d) {
  out <- curve_keys(d)
  groups <- sort(unique(d$group))
  if (length(groups) >= 2) {
    for (strat in c(FALSE, TRUE)) {
      for (rho in c(0, 1)) out <- c(out, logrank_keys(d, strat, rho))
      out <- c(out, cox_keys(d, strat))
    }
  }
  for (g in groups) {
    dg <- d[d$group == g, ]
    out <- c(out, weibull_keys(dg, g), gompertz_keys(dg, g))
  }
  out
}

close_enough <- function(a, b) {
  both_na <- is.na(a) & is.na(b)
  one_na <- xor(is.na(a), is.na(b))
  diff <- abs(a - b) <= 1e-8 * pmax(abs(a), abs(b)) + 1e-11
  both_na | (!one_na & !is.na(diff) & diff)
}

bad <- data.frame()
compared <- 0
started <- Sys.time()
for (ds in sort(unique(data$dataset))) {
  d <- data[data$dataset == ds, ]
  r <- r_keys(d)
  o <- ours[ours$dataset == ds, ]
  mine <- setNames(o$value, o$key)
  keys <- union(names(r), names(mine))
  rv <- unname(r[keys]); mv <- unname(mine[keys])
  missing <- !(keys %in% names(r)) | !(keys %in% names(mine))
  ok <- close_enough(mv, rv) & !missing
  compared <- compared + length(keys)
  if (any(!ok)) {
    bad <- rbind(bad, data.frame(dataset = ds, key = keys[!ok], budledger = mv[!ok], R = rv[!ok]))
  }
}
cat(sprintf("compared %d numbers over %d data sets with R survival %s in %.1f s\n",
            compared, length(unique(data$dataset)), packageVersion("survival"),
            as.numeric(Sys.time() - started, units = "secs")))
if (nrow(bad) > 0) {
  cat(sprintf("%d disagreements; first ones:\n", nrow(bad)))
  print(head(bad, 40), digits = 17, row.names = FALSE)
  quit(status = 1)
}
cat("all agree\n")
