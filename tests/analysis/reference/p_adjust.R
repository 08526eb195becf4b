# Outside reference for loupe's multiple-testing adjustments: R's p.adjust.
# Usage: Rscript p_adjust.R FILE   (one p-value per line, NA allowed)
# Prints bh_I=... and holm_I=... for I = 0, 1, ...
p <- as.numeric(readLines(commandArgs(trailingOnly = TRUE)[1]))
bh <- p.adjust(p, method = "BH")
holm <- p.adjust(p, method = "holm")
for (i in seq_along(p)) {
  cat(sprintf("bh_%d=%.17g\n", i - 1, bh[i]))
  cat(sprintf("holm_%d=%.17g\n", i - 1, holm[i]))
}
