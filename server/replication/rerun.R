# Recomputes a saved Stratasieve run with base R only (stats::fisher.test, stats::mantelhaen.test,
# stats::glm, stats::p.adjust) from the rows the run analysed, and prints each of the app's
# numbers beside R's with their relative difference.
#
#   Rscript rerun.R [folder]      (folder: where rows.csv and the other files are; default ".")
#
# Writes comparison.csv beside the data. Numbers the app computes by a method base R does not
# have (Firth's penalised regression, Monte Carlo p-values, clade-adjusted slopes) are listed with
# the reason and not compared.

args <- commandArgs(trailingOnly = TRUE)
folder <- if (length(args) >= 1) args[1] else "."
read <- function(name) {
  read.csv(file.path(folder, name), colClasses = "character", na.strings = "", check.names = FALSE, encoding = "UTF-8")
}
rows <- read("rows.csv")
traits <- read("traits.csv")
columns <- read("model-columns.csv")
app <- read("app-results.csv")
app$state[is.na(app$state)] <- ""
settings <- read("settings.csv")
setting <- function(field) settings$value[settings$field == field]

level <- as.numeric(setting("level"))
z <- qnorm(1 - (1 - level) / 2)
adjust_method <- c(bh = "BH", holm = "holm", bonferroni = "bonferroni")[[setting("correction")]]
fit_control <- glm.control(epsilon = 1e-14, maxit = 200)

recomputed <- list()
skipped <- list()
skip <- function(boundary, trait, state, quantities, why) {
  for (quantity in quantities) {
    skipped[[length(skipped) + 1]] <<- data.frame(
      boundary = as.character(boundary), trait = trait, state = state, quantity = quantity, why = why,
      stringsAsFactors = FALSE
    )
  }
}
keep <- function(boundary, trait, state, quantity, value) {
  recomputed[[length(recomputed) + 1]] <<- data.frame(
    boundary = as.character(boundary), trait = trait, state = state, quantity = quantity, r = value,
    stringsAsFactors = FALSE
  )
}

# A numeric trait as the run used it: optional log10 (values <= 0 unusable), then optional
# centring and scaling by the mean and sample standard deviation of the usable values.
numeric_values <- function(raw, transform, standardise) {
  x <- suppressWarnings(as.numeric(raw))
  if (transform == "log10") {
    x[!is.na(x) & x <= 0] <- NA
    x <- log10(x)
  }
  if (standardise == "true" && sum(!is.na(x)) >= 2) x <- (x - mean(x, na.rm = TRUE)) / sd(x, na.rm = TRUE)
  x
}

for (b in unique(rows$boundary)) {
  d <- rows[rows$boundary == b, , drop = FALSE]
  y <- as.integer(d$outcome)
  specs <- traits[traits$boundary == b, , drop = FALSE]
  p_values <- c()

  for (k in seq_len(nrow(specs))) {
    spec <- specs[k, ]
    key <- spec$key
    if (spec$kind == "states") {
      states <- strsplit(spec$states, "|", fixed = TRUE)[[1]]
      v <- d[[key]]
      v[!(v %in% states)] <- NA
      ok <- !is.na(v)
      counts <- table(factor(v[ok], levels = states), factor(y[ok], levels = c(1, 0)))
      counts <- counts[rowSums(counts) > 0, , drop = FALSE]
      if (nrow(counts) >= 2 && all(colSums(counts) > 0)) {
        # R's network algorithm can run out of workspace on a table (many states of similar size,
        # small p): that p-value is then listed as not compared, with R's reason, and the app's own
        # p-value stands in for it in the multiple-testing correction of the other traits.
        p <- tryCatch(fisher.test(counts, workspace = 2e8)$p.value, error = function(e) conditionMessage(e))
        if (is.character(p)) {
          skip(b, key, "", c("test_p", "adjusted_p"), paste("stats::fisher.test did not finish:", gsub("\\s+", " ", p)))
          p <- as.numeric(app$app[as.character(app$boundary) == as.character(b) & app$trait == key & app$quantity == "test_p"][1])
        } else {
          keep(b, key, "", "test_p", p)
        }
        p_values[key] <- p
      }
      ref <- spec$reference
      if (is.na(ref)) next
      for (s in states[states != ref]) {
        cells <- c(sum(v == s & y == 1, na.rm = TRUE), sum(v == s & y == 0, na.rm = TRUE),
                   sum(v == ref & y == 1, na.rm = TRUE), sum(v == ref & y == 0, na.rm = TRUE))
        if (cells[1] + cells[2] == 0) next
        # Woolf's interval on the sample odds ratio; 0.5 added to every cell when one is zero.
        if (any(cells == 0)) cells <- cells + 0.5
        log_or <- log(cells[1] * cells[4] / (cells[2] * cells[3]))
        se <- sqrt(sum(1 / cells))
        keep(b, key, s, "crude_or", exp(log_or))
        keep(b, key, s, "crude_ci_low", exp(log_or - z * se))
        keep(b, key, s, "crude_ci_high", exp(log_or + z * se))

        # Mantel-Haenszel over the clades that hold both states and both outcomes.
        in_pair <- ok & (v == s | v == ref) & !is.na(d$clade) & d$clade != ""
        strata <- list()
        for (clade in unique(d$clade[in_pair])) {
          here <- in_pair & d$clade == clade
          t2 <- matrix(c(sum(here & v == s & y == 1), sum(here & v == ref & y == 1),
                         sum(here & v == s & y == 0), sum(here & v == ref & y == 0)), 2, 2)
          if (all(rowSums(t2) > 0) && all(colSums(t2) > 0)) strata[[length(strata) + 1]] <- t2
        }
        if (length(strata) >= 2) {
          mh <- mantelhaen.test(array(unlist(strata), dim = c(2, 2, length(strata))), conf.level = level)
          keep(b, key, s, "clade_adjusted_or", unname(mh$estimate))
          keep(b, key, s, "clade_adjusted_ci_low", mh$conf.int[1])
          keep(b, key, s, "clade_adjusted_ci_high", mh$conf.int[2])
        } else {
          skip(b, key, s, c("clade_adjusted_or", "clade_adjusted_ci_low", "clade_adjusted_ci_high"),
            sprintf("%d clade(s) hold both states and both outcomes; stats::mantelhaen.test needs two", length(strata)))
        }
      }
    } else {
      x <- numeric_values(d[[key]], spec$transform, spec$standardise)
      ok <- !is.na(x)
      if (sum(ok) < 2 || length(unique(y[ok])) < 2) next
      fit <- glm(y[ok] ~ x[ok], family = binomial, control = fit_control)
      p <- pchisq(fit$null.deviance - fit$deviance, df = 1, lower.tail = FALSE)
      keep(b, key, "", "test_p", p)
      p_values[key] <- p
      slope <- coef(summary(fit))[2, ]
      keep(b, key, "", "crude_or", exp(slope[["Estimate"]]))
      keep(b, key, "", "crude_ci_low", exp(slope[["Estimate"]] - z * slope[["Std. Error"]]))
      keep(b, key, "", "crude_ci_high", exp(slope[["Estimate"]] + z * slope[["Std. Error"]]))
    }
  }

  if (length(p_values) > 0) {
    adjusted <- p.adjust(p_values, method = adjust_method)
    for (key in names(adjusted)) keep(b, key, "", "adjusted_p", adjusted[[key]])
  }

  # The multiple regression over complete cases, with the app's own coding of every column.
  cols <- columns[columns$boundary == b, , drop = FALSE]
  if (nrow(cols) > 0) {
    usable <- rep(TRUE, nrow(d))
    for (key in unique(cols$trait)) {
      spec <- specs[specs$key == key, ]
      if (spec$kind == "states") {
        usable <- usable & d[[key]] %in% strsplit(spec$states, "|", fixed = TRUE)[[1]]
      } else {
        usable <- usable & !is.na(numeric_values(d[[key]], spec$transform, "false"))
      }
    }
    X <- matrix(0, nrow = sum(usable), ncol = nrow(cols))
    for (j in seq_len(nrow(cols))) {
      col <- cols[j, ]
      raw <- d[[col$trait]][usable]
      if (col$kind == "state") {
        X[, j] <- as.numeric(raw == col$state)
      } else {
        X[, j] <- (numeric_values(raw, col$transform, "false") - as.numeric(col$center)) / as.numeric(col$scale)
      }
    }
    colnames(X) <- cols$name
    fit <- glm(y[usable] ~ X, family = binomial, control = fit_control)
    estimates <- coef(summary(fit))
    names_out <- c("(Intercept)", cols$name)
    for (j in seq_len(nrow(estimates))) {
      keep(b, "(model)", names_out[j], "coefficient", estimates[j, "Estimate"])
      keep(b, "(model)", names_out[j], "coefficient_se", estimates[j, "Std. Error"])
    }
  }
}

r <- do.call(rbind, recomputed)
both <- merge(app, r, by = c("boundary", "trait", "state", "quantity"), all.x = TRUE, sort = FALSE)
if (length(skipped) > 0) {
  both <- merge(both, do.call(rbind, skipped), by = c("boundary", "trait", "state", "quantity"), all.x = TRUE, sort = FALSE)
} else {
  both$why <- NA
}
both$app <- as.numeric(both$app)
both$relative_difference <- abs(both$app - both$r) / pmax(abs(both$r), 1e-300)
both$compared <- is.na(both$not_compared) & is.na(both$why) & !is.na(both$r) & !is.na(both$app)
both$status <- ifelse(both$compared, "compared",
  ifelse(!is.na(both$not_compared), paste("not compared:", both$not_compared),
    paste("not compared:", ifelse(is.na(both$why), "R gave no value", both$why))))
both <- both[order(as.integer(both$boundary), both$trait, both$state, both$quantity), ]
write.csv(both[, c("boundary", "trait", "state", "quantity", "app", "r", "relative_difference", "status")],
  file.path(folder, "comparison.csv"), row.names = FALSE)

options(width = 160)
shown <- both[both$compared, c("boundary", "trait", "state", "quantity", "app", "r", "relative_difference")]
shown$app <- signif(shown$app, 10)
shown$r <- signif(shown$r, 10)
shown$relative_difference <- signif(shown$relative_difference, 3)
cat("Recomputed with base R:\n")
print(shown, row.names = FALSE)
others <- both[!both$compared, ]
if (nrow(others) > 0) {
  cat("\nNot compared:\n")
  cat(sprintf("  boundary %s, %s %s %s: %s\n", others$boundary, others$trait, others$state, others$quantity, sub("^not compared: ", "", others$status)), sep = "")
}
worst <- if (any(both$compared)) max(both$relative_difference[both$compared]) else NA
cat(sprintf("\nCompared %d numbers; largest relative difference %s. Not compared: %d (reasons above).\n",
  sum(both$compared), format(worst, digits = 3), sum(!both$compared)))
