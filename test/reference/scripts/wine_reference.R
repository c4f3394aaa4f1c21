#!/usr/bin/env Rscript
# Reference figures for the Wine table from R (stats, MASS), and what MASS::lda does with the copy
# whose `ash` column is multiplied by 1e-5.
#   Rscript test/reference/scripts/wine_reference.R [OUT_DIR]
# Writes OUT_DIR/wine.r.json (default test/reference/fixtures). See reference_lib.R.
here <- local({
  arg <- grep("^--file=", commandArgs(trailingOnly = FALSE), value = TRUE)
  dirname(normalizePath(sub("^--file=", "", arg[1])))
})
source(file.path(here, "reference_lib.R"))
args <- commandArgs(trailingOnly = TRUE)
out_dir <- if (length(args) >= 1) args[1] else file.path(here, "..", "fixtures")

data_dir <- file.path(here, "..", "..", "fixtures", "wine")
out <- reference(file.path(data_dir, "wine.csv"), "cultivar", pca = FALSE)

scaled <- load_table(file.path(data_dir, "wine-ash-scaled.csv"), "cultivar")
n <- nrow(scaled$X); K <- nlevels(scaled$g)
default_tol <- tryCatch({ lda(scaled$X, scaled$g); "accepted" }, error = function(e) conditionMessage(e))
small_tol <- lda(scaled$X, scaled$g, tol = 1e-10)
out$ashScaled <- list(
  massDefaultTol = fig("R MASS::lda(x, grouping) with its default tol = 1e-4 on wine-ash-scaled.csv: the error message",
                       default_tol),
  eigenvaluesSmallTol = fig("R MASS::lda(x, grouping, tol = 1e-10)$svd^2 * (K - 1)/(n - K) on wine-ash-scaled.csv",
                            I(small_tol$svd^2 * (K - 1) / (n - K))))

write_json(out, out_dir, "wine.r.json")
