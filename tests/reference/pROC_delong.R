# Reference DeLong interval for tocsin's evaluation tests, from R's pROC.
# Usage: Rscript pROC_delong.R DATA.csv   (columns score,label,probability)
# Prints "key value" lines with 17 significant digits.
args <- commandArgs(trailingOnly = TRUE)
suppressPackageStartupMessages(library(pROC))
d <- read.csv(args[1])
# Controls are label 0, cases label 1; higher scores mean case (no auto direction).
r <- roc(d$label, d$score, levels = c(0, 1), direction = "<", quiet = TRUE)
ci <- ci.auc(r, method = "delong", conf.level = 0.95)
cat(sprintf("auc %.17g\n", as.numeric(ci[2])))
cat(sprintf("lower %.17g\n", as.numeric(ci[1])))
cat(sprintf("upper %.17g\n", as.numeric(ci[3])))
cat(sprintf("variance %.17g\n", var(r, method = "delong")))
