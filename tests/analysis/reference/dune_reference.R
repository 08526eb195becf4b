# The "dune" meadow vegetation data shipped with vegan (Jongman, ter Braak &
# van Tongeren 1987): 20 sites x 30 species, grouped by dune.env$Management.
# Writes DIR/dune.csv (counts, sites in rows) and DIR/management.txt, then prints
# vegan's PERMANOVA and PERMDISP on Hellinger-transformed data (Legendre &
# Gallagher 2001: y = sqrt(x / row total), Euclidean distance).
# Usage: Rscript dune_reference.R DIR PERMUTATIONS SEED
args <- commandArgs(trailingOnly = TRUE)
dir <- args[1]
nperm <- as.integer(args[2])
seed <- as.integer(args[3])
suppressPackageStartupMessages(library(vegan))
data(dune)
data(dune.env)
write.table(dune, file.path(dir, "dune.csv"), sep = ",", row.names = FALSE, col.names = FALSE)
writeLines(as.character(dune.env$Management), file.path(dir, "management.txt"))
out <- function(key, value) cat(sprintf("%s=%.17g\n", key, value))
hel <- decostand(dune, "hellinger")
d <- dist(hel)
set.seed(seed)
a <- adonis2(hel ~ Management, data = dune.env, method = "euclidean", permutations = nperm)
out("permanova_f", a$F[1])
out("permanova_r2", a$R2[1])
out("permanova_p", a[["Pr(>F)"]][1])
bd <- betadisper(d, dune.env$Management, type = "centroid")
set.seed(seed)
pt <- permutest(bd, permutations = nperm)
out("permdisp_f", pt$tab$F[1])
out("permdisp_p", pt$tab[["Pr(>F)"]][1])
lv <- levels(dune.env$Management)
for (i in seq_along(lv)) out(paste0("permdisp_mean_distance_", lv[i]), bd$group.distances[i])
