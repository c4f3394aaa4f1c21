# The R way to the same answer, for the side-by-side benchmark (bench/bench.ts).
#
# data.table's fread reads the whole table into memory, MASS::lda fits the discriminants, prcomp
# the principal components, and lda(CV = TRUE) gives leave-one-out predictions, MASS's own
# cross-validation. The tolerance is lowered from its default 1e-4, which takes the benchmark's
# columns of magnitude 1e-8 for constant ones and stops.
#
#   Rscript bench/alternatives/lda.R FILE LABEL
#
# Prints one JSON line: rows, training and cross-validated accuracy.
args <- commandArgs(trailingOnly = TRUE)
suppressPackageStartupMessages({
  library(data.table)
  library(MASS)
})
frame <- fread(args[1])
y <- factor(frame[[args[2]]])
frame[, (args[2]) := NULL]
X <- as.matrix(frame)
fit <- lda(X, grouping = y, tol = 1e-30)
training <- mean(predict(fit, X)$class == y)
pca <- prcomp(X)
loo <- lda(X, grouping = y, tol = 1e-30, CV = TRUE)
cat(sprintf('{"rows": %d, "training": %.6f, "crossValidated": %.6f, "pc1": %.6f}\n',
            nrow(X), training, mean(loo$class == y), pca$sdev[1]^2 / sum(pca$sdev^2)))
