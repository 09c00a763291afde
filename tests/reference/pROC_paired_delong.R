# Reference paired DeLong test for tocsin's paired_auc_delong, from R's pROC:
# roc.test(method = "delong", paired = TRUE), i.e. DeLong, DeLong &
# Clarke-Pearson (1988), Biometrics 44:837-845, as implemented by Robin et al.
# (2011), BMC Bioinformatics 12:77.
# Usage:
#   Rscript pROC_paired_delong.R DATA.csv
#       DATA.csv has columns a,b,label (label 1 = case, 0 = control)
#   Rscript pROC_paired_delong.R --asah MARKER_A MARKER_B DATA.csv
#       first writes pROC's aSAH data set (Turck et al. 2010; 113 patients
#       after aneurysmal subarachnoid haemorrhage) to DATA.csv: the two named
#       markers as a and b (wfns as its grade 1-5) and label 1 for outcome Poor
# Prints "key value" lines with 17 significant digits.
args <- commandArgs(trailingOnly = TRUE)
suppressPackageStartupMessages(library(pROC))
if (args[1] == "--asah") {
    data(aSAH, package = "pROC", envir = environment())
    marker <- function(name) as.numeric(aSAH[[name]])
    d <- data.frame(a = marker(args[2]), b = marker(args[3]), label = as.integer(aSAH$outcome == "Poor"))
    lines <- sprintf("%.17g,%.17g,%d", d$a, d$b, d$label)
    writeLines(c("a,b,label", lines), args[4])
    path <- args[4]
} else {
    path <- args[1]
}
d <- read.csv(path)
# Controls are label 0, cases label 1; higher scores mean case for both scores
# (no automatic direction, which could differ between the two).
r_a <- roc(d$label, d$a, levels = c(0, 1), direction = "<", quiet = TRUE)
r_b <- roc(d$label, d$b, levels = c(0, 1), direction = "<", quiet = TRUE)
t <- roc.test(r_a, r_b, method = "delong", paired = TRUE, conf.level = 0.95)
cat(sprintf("auc_a %.17g\n", as.numeric(auc(r_a))))
cat(sprintf("auc_b %.17g\n", as.numeric(auc(r_b))))
cat(sprintf("difference %.17g\n", as.numeric(auc(r_a)) - as.numeric(auc(r_b))))
cat(sprintf("z %.17g\n", as.numeric(t$statistic)))
cat(sprintf("p %.17g\n", t$p.value))
cat(sprintf("lower %.17g\n", t$conf.int[1]))
cat(sprintf("upper %.17g\n", t$conf.int[2]))
cat(sprintf("variance_a %.17g\n", var(r_a, method = "delong")))
cat(sprintf("variance_b %.17g\n", var(r_b, method = "delong")))
cat(sprintf("covariance %.17g\n", cov(r_a, r_b, method = "delong")))
