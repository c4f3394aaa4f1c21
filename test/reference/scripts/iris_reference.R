#!/usr/bin/env Rscript
# Reference figures for the Iris table from R (stats, MASS).
#   Rscript test/reference/scripts/iris_reference.R [OUT_DIR]
# Reads test/fixtures/iris/iris.csv, checks it value by value against R's datasets::iris, and
# writes OUT_DIR/iris.r.json (default test/reference/fixtures). See reference_lib.R.
here <- local({
  arg <- grep("^--file=", commandArgs(trailingOnly = FALSE), value = TRUE)
  dirname(normalizePath(sub("^--file=", "", arg[1])))
})
source(file.path(here, "reference_lib.R"))
args <- commandArgs(trailingOnly = TRUE)
out_dir <- if (length(args) >= 1) args[1] else file.path(here, "..", "fixtures")

path <- file.path(here, "..", "..", "fixtures", "iris", "iris.csv")
out <- reference(path, "species")

csv <- read.csv(path, stringsAsFactors = FALSE)
differing <- sum(as.matrix(csv[, 1:4]) != as.matrix(datasets::iris[, 1:4])) +
  sum(csv$species != as.character(datasets::iris$Species))
out$cellsDifferingFromRDatasetsIris <- fig(
  "R: cells of test/fixtures/iris/iris.csv that differ from datasets::iris (numbers compared as doubles, species as text)",
  differing)

write_json(out, out_dir, "iris.r.json")
