# Reference figures for a labelled table from R (stats, MASS), shared by iris_reference.R and
# wine_reference.R (they `source()` this file). Every figure is written as
# {"source": "<how it was computed>", "value": ...} so the JSON says where each number comes from.
# Numbers are written with sprintf("%.17g") (full precision); jsonlite is not needed.
suppressPackageStartupMessages(library(MASS))

# ------------------------------------------------------------------------------------------ JSON

json_string <- function(s) {
  s <- gsub("\\", "\\\\", s, fixed = TRUE)
  s <- gsub("\"", "\\\"", s, fixed = TRUE)
  s <- gsub("\n", "\\n", s, fixed = TRUE)
  s <- gsub("\t", "\\t", s, fixed = TRUE)
  paste0("\"", s, "\"")
}

json_number <- function(v) {
  if (any(!is.finite(v))) stop("a reference figure is not finite: ", paste(v, collapse = " "))
  ifelse(v == round(v) & abs(v) < 2^53, sprintf("%.0f", v), sprintf("%.17g", v))
}

# Length-1 vectors are written as scalars unless wrapped in I() (then always an array); a matrix
# is an array of its rows; a named list is an object; an unnamed list is an array.
to_json <- function(x, indent = "") {
  inner <- paste0(indent, " ")
  if (is.null(x)) return("null")
  if (is.matrix(x)) {
    rows <- vapply(seq_len(nrow(x)), function(i) to_json(I(unname(x[i, ]))), "")
    return(paste0("[\n", paste0(inner, rows, collapse = ",\n"), "\n", indent, "]"))
  }
  if (is.list(x)) {
    parts <- vapply(x, to_json, "", indent = inner)
    if (!is.null(names(x))) {
      parts <- paste0(json_string(names(x)), ": ", parts)
      return(paste0("{\n", paste0(inner, parts, collapse = ",\n"), "\n", indent, "}"))
    }
    return(paste0("[\n", paste0(inner, parts, collapse = ",\n"), "\n", indent, "]"))
  }
  as_array <- inherits(x, "AsIs") || length(x) != 1
  x <- unclass(unname(x))
  items <- if (is.character(x) || is.factor(x)) json_string(as.character(x))
           else if (is.logical(x)) ifelse(x, "true", "false")
           else json_number(as.numeric(x))
  if (as_array) paste0("[", paste(items, collapse = ", "), "]") else items
}

write_json <- function(x, dir, name) {
  dir.create(dir, showWarnings = FALSE, recursive = TRUE)
  path <- file.path(dir, name)
  writeLines(to_json(x), path)
  cat("wrote", path, "\n")
}

fig <- function(source, value) list(source = source, value = value)

versions <- function() list(R = R.version.string, MASS = as.character(packageVersion("MASS")),
                            stats = as.character(packageVersion("stats")))

# Directory of the running script (Rscript --file=...), to find the data relative to it.
script_dir <- function() {
  arg <- grep("^--file=", commandArgs(trailingOnly = FALSE), value = TRUE)
  dirname(normalizePath(sub("^--file=", "", arg[1])))
}

# ------------------------------------------------------------------------------------- figures

load_table <- function(path, label) {
  frame <- read.csv(path, check.names = FALSE, stringsAsFactors = FALSE)
  features <- setdiff(names(frame), label)
  # Labels sorted by code point (the product's order for non-numeric labels).
  labels <- sort(unique(frame[[label]]), method = "radix")
  list(frame = frame, X = as.matrix(frame[, features]), g = factor(frame[[label]], levels = labels),
       features = features, labels = labels)
}

classification <- function(g, prediction, source) {
  C <- unclass(table(g, factor(prediction$class, levels = levels(g))))
  list(correct = fig(source, sum(diag(C))),
       accuracy = fig(source, sum(diag(C)) / length(g)),
       confusion = fig(paste0(source, "; rows true class, columns predicted"), C),
       precision = fig(paste0(source, "; diag / column sum"), I(diag(C) / colSums(C))),
       recall = fig(paste0(source, "; diag / row sum"), I(diag(C) / rowSums(C))),
       posterior = fig(paste0(source, "; $posterior, rows x K, file order"), unname(prediction$posterior)))
}

manova_test <- function(X, g, test) {
  s <- summary(manova(X ~ g), test = test)$stats[1, ]
  fig(sprintf("R stats::summary.manova(manova(X ~ class), test = \"%s\")$stats", test),
      list(statistic = s[[2]], F = s[[3]], df1 = s[[4]], df2 = s[[5]], p = s[[6]]))
}

reference <- function(path, label, pca = TRUE) {
  t <- load_table(path, label)
  X <- t$X; g <- t$g
  n <- nrow(X); d <- ncol(X); K <- nlevels(g)
  means <- apply(X, 2, function(col) tapply(col, g, mean))
  Z <- X - means[as.integer(g), ]
  S_W <- crossprod(Z)
  fit <- lda(X, g)
  k <- length(fit$svd)
  lambda_mass <- fit$svd^2 * (K - 1) / (n - K)
  # The same eigenvalues solved directly: S_W = RᵀR (chol), eigen of R⁻ᵀ S_B R⁻¹ (symmetric).
  D <- sweep(means, 2, colMeans(X))
  S_B <- crossprod(D * sqrt(as.vector(table(g))))
  Rinv <- backsolve(chol(S_W), diag(d))
  lambda_chol <- eigen(t(Rinv) %*% S_B %*% Rinv, symmetric = TRUE)$values[1:k]
  scores <- predict(fit)$x
  out <- list(
    versions = versions(),
    data = list(file = basename(path), rows = n, features = I(t$features), labels = I(t$labels)),
    eigenvalues = fig("R MASS::lda(x, grouping)$svd^2 * (K - 1)/(n - K)", I(lambda_mass)),
    eigenvaluesCholesky = fig("R: eigen(R^-T S_B R^-1, symmetric = TRUE)$values with R = chol(S_W)",
                              I(lambda_chol)),
    svdRelation = fig(paste("R: max |svd^2 (K-1)/(n-K) / lambda - 1| over the axes, lambda from the",
                            "Cholesky route: MASS's svd^2 equals lambda (n - K)/(K - 1)"),
                      max(abs(lambda_mass / lambda_chol - 1))),
    coefficients = fig("R MASS::lda()$scaling (features x k; columns up to sign)", fit$scaling),
    standardizedCoefficients = fig("R MASS::lda()$scaling * sqrt(diag(S_W)/(n - K)) (up to sign)",
                                   fit$scaling * sqrt(diag(S_W) / (n - K))),
    scores = fig(paste("R MASS predict(lda)$x (rows x k, centred at the prior-weighted mean of the class",
                       "means = the overall mean for empirical priors; columns up to sign)"), scores),
    centroids = fig("R: class means of MASS predict(lda)$x (classes x k; up to sign)",
                    apply(scores, 2, function(col) tapply(col, g, mean))),
    wilks = manova_test(X, g, "Wilks"),
    pillai = manova_test(X, g, "Pillai"),
    hotellingLawley = manova_test(X, g, "Hotelling-Lawley"),
    roy = manova_test(X, g, "Roy"),
    univariate = fig("R stats: summary(aov(x ~ class)) F and Pr(>F) per feature",
                     list(F = I(sapply(seq_len(d), function(j) summary(aov(X[, j] ~ g))[[1]][1, 4])),
                          p = I(sapply(seq_len(d), function(j) summary(aov(X[, j] ~ g))[[1]][1, 5])))),
    centroidDistances = fig("R stats::mahalanobis(m_i, m_j, S_W/(n - K)), square root",
                            outer(seq_len(K), seq_len(K), Vectorize(function(i, j)
                              sqrt(mahalanobis(means[i, ], means[j, ], S_W / (n - K)))))),
    training = classification(g, predict(fit),
                              "R MASS predict(lda(x, grouping))$class (Sigma = S_W/(n - K), empirical priors)"),
    trainingUniform = classification(g, predict(lda(X, g, prior = rep(1 / K, K))),
                                     "R MASS predict(lda(x, grouping, prior = rep(1/K, K)))$class"),
    leaveOneOutMass = classification(g, lda(X, g, CV = TRUE),
                                     paste("R MASS lda(x, grouping, CV = TRUE): exact leave-one-out",
                                           "that keeps the FULL-data priors (see MASS:::lda.default)")),
    leaveOneOutUniform = classification(g, lda(X, g, CV = TRUE, prior = rep(1 / K, K)),
                                        paste("R MASS lda(x, grouping, CV = TRUE, prior = rep(1/K, K)): exact",
                                              "leave-one-out with fixed priors 1/K, Sigma' = S_W'/(n - 1 - K)"))
  )
  if (pca) {
    ratio <- function(p) I(p$sdev^2 / sum(p$sdev^2))
    out$pca <- list(
      covariance = fig("R stats::prcomp(x)$sdev^2 / sum", ratio(prcomp(X))),
      standardized = fig("R stats::prcomp(x, scale. = TRUE)$sdev^2 / sum", ratio(prcomp(X, scale. = TRUE))))
  }
  out
}
