# Outside reference for loupe's group tests: vegan's adonis2 (PERMANOVA),
# betadisper(type = "centroid") + permutest (PERMDISP) and anosim (ANOSIM),
# on a distance matrix that the C++ test wrote.
# Usage: Rscript vegan_group_tests.R DIR PERMUTATIONS random|complete SEED
#   DIR/dist.csv    N x N distances, no header
#   DIR/groups.txt  one group label per line
#   DIR/strata.txt  optional: one stratum label per line (permutations within strata)
# Prints key=value lines.
args <- commandArgs(trailingOnly = TRUE)
dir <- args[1]
nperm <- as.integer(args[2])
complete <- args[3] == "complete"
seed <- as.integer(args[4])
suppressPackageStartupMessages(library(vegan))
d <- as.dist(as.matrix(read.csv(file.path(dir, "dist.csv"), header = FALSE)))
g <- factor(scan(file.path(dir, "groups.txt"), quiet = TRUE))
strata_file <- file.path(dir, "strata.txt")
blocks <- if (file.exists(strata_file)) factor(scan(strata_file, quiet = TRUE)) else NULL
control <- function() {
  h <- if (complete) how(complete = TRUE, maxperm = 1e7, minperm = 1e7) else how(nperm = nperm)
  if (!is.null(blocks)) setBlocks(h) <- blocks
  h
}
out <- function(key, value) cat(sprintf("%s=%.17g\n", key, value))

ctrl <- control()
set.seed(seed)
a <- adonis2(d ~ g, data = data.frame(g = g), permutations = ctrl)
out("permanova_f", a$F[1])
out("permanova_r2", a$R2[1])
out("permanova_p", a[["Pr(>F)"]][1])

set.seed(seed)
bd <- betadisper(d, g, type = "centroid")
pt <- permutest(bd, permutations = ctrl)
out("permdisp_f", pt$tab$F[1])
out("permdisp_p", pt$tab[["Pr(>F)"]][1])
for (i in seq_along(bd$group.distances)) out(paste0("permdisp_mean_distance_", i - 1), bd$group.distances[i])

set.seed(seed)
an <- anosim(d, g, permutations = ctrl)
out("anosim_r", an$statistic)
out("anosim_p", an$signif)

# Pairwise PERMANOVA: adonis2 on each pair's documents only.
levels_g <- levels(g)
if (length(levels_g) > 2) {
  m <- as.matrix(d)
  for (i in 1:(length(levels_g) - 1)) for (j in (i + 1):length(levels_g)) {
    keep <- g %in% levels_g[c(i, j)]
    gp <- droplevels(g[keep])
    ap <- adonis2(as.dist(m[keep, keep]) ~ gp, data = data.frame(gp = gp), permutations = 0)
    out(sprintf("pairwise_f_%d_%d", i - 1, j - 1), ap$F[1])
    out(sprintf("pairwise_r2_%d_%d", i - 1, j - 1), ap$R2[1])
  }
}
