# vegan's adonis2 on the Hellinger distances of DIR/theta.csv grouped by
# DIR/groups.txt, timed (the distance matrix is built before the clock starts).
# Usage: Rscript analysis_permanova_vegan.R DIR PERMUTATIONS -> pseudo_f=..., seconds=...
args <- commandArgs(trailingOnly = TRUE)
suppressPackageStartupMessages(library(vegan))
theta <- as.matrix(read.csv(file.path(args[1], "theta.csv"), header = FALSE))
g <- factor(scan(file.path(args[1], "groups.txt"), quiet = TRUE))
d <- dist(sqrt(theta)) / sqrt(2)
set.seed(1)
seconds <- system.time(a <- adonis2(d ~ g, data = data.frame(g = g), permutations = as.integer(args[2]), parallel = 1))[["elapsed"]]
cat(sprintf("pseudo_f=%.17g\nseconds=%.6g\n", a$F[1], seconds))
