#!/usr/bin/env Rscript
# Golden partial ROC values for package areasweep/metrics from Debian's
# r-cran-proc. Reads cases.csv (written by golden.py) and writes
# proc_golden.csv with, per case:
#   quantity "auc"       : pROC full AUC, cells unweighted except that each
#                          background row is replicated `weight` times
#   quantity "pauc_band" : pROC partial AUC with partial.auc = c(1, 1-E),
#                          partial.auc.focus = "sensitivity",
#                          partial.auc.correct = FALSE, for E = 0.05, 0.10,
#                          0.20. pROC's x axis is specificity = 1 - x, so
#                          this is the area right of our area-ROC curve
#                          inside the band 1-E <= y <= 1 (A_band).
#   quantity "delong_var": pROC var(roc, method = "delong"), the DeLong,
#                          DeLong & Clarke-Pearson (1988) variance of the
#                          AUC with every (replicated) background row a
#                          sampled cell, counted once
# It also writes t975_golden.csv: R's qt(0.975, df), the 0.975 quantile of
# Student's t (base R, stats), for the paired AUC intervals' multiplier.
# pROC has no case weights, so integer weights are honoured by replicating
# background rows. Deterministic: no randomness is used.
suppressPackageStartupMessages(library(pROC))

args <- commandArgs(trailingOnly = FALSE)
file_arg <- sub("^--file=", "", args[grep("^--file=", args)])
here <- if (length(file_arg)) dirname(normalizePath(file_arg)) else "."

cases <- read.csv(file.path(here, "cases.csv"), stringsAsFactors = FALSE)
out <- data.frame(case = character(), quantity = character(), e = character(),
                  value = character(), stringsAsFactors = FALSE)
for (name in unique(cases$case)) {
  d <- cases[cases$case == name, ]
  bg <- d[d$role == "bg", ]
  controls <- rep(as.numeric(bg$value), times = bg$weight)
  presences <- as.numeric(d$value[d$role == "test"])
  r <- roc(controls = controls, cases = presences, direction = "<", quiet = TRUE)
  out[nrow(out) + 1, ] <- c(name, "auc", "0", sprintf("%.17g", as.numeric(auc(r))))
  if (length(presences) >= 2) {
    out[nrow(out) + 1, ] <- c(name, "delong_var", "0", sprintf("%.17g", var(r, method = "delong")))
  }
  for (e in c(0.05, 0.10, 0.20)) {
    p <- auc(r, partial.auc = c(1, 1 - e), partial.auc.focus = "sensitivity",
             partial.auc.correct = FALSE)
    out[nrow(out) + 1, ] <- c(name, "pauc_band", sprintf("%.2f", e),
                              sprintf("%.17g", as.numeric(p)))
  }
}
write.csv(out, file.path(here, "proc_golden.csv"), row.names = FALSE, quote = FALSE)

dfs <- c(1, 2, 3, 4, 5, 9, 10, 19, 29, 30, 44, 49, 99, 149, 499, 1000, 100000)
write.csv(data.frame(df = sprintf("%d", as.integer(dfs)), q = sprintf("%.17g", qt(0.975, dfs))),
          file.path(here, "t975_golden.csv"), row.names = FALSE, quote = FALSE)
