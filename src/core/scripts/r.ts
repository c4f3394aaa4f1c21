/**
 * The R reproduction script: base R reads the file and does the linear algebra, MASS::lda gives
 * the training predictions of the exact solver (the same Gaussian rule with covariance S_W/(n − K)
 * and the given priors), and the parts MASS does differently are written out from their
 * definitions: Ledoit–Wolf shrinkage (MASS has none), leave-one-out (MASS's CV keeps the full-data
 * priors; ours re-estimates them without the row) and the documented k-fold generator.
 * Strings are written with \u escapes and JSON is written by hand, so the script means the same in
 * any locale and needs no package beyond MASS.
 */
import { rValue, type PlainValue } from './literals';
import { commentText, rString } from './quoting';
import { optionSummary, type ReproductionPlan } from './plan';

function parameters(plan: ReproductionPlan): string {
  const cv: PlainValue = plan.cv.method === 'kfold' ? { method: 'kfold', folds: plan.cv.folds, seed: plan.cv.seed } : { method: plan.cv.method };
  const p = (name: string, value: PlainValue, note?: string) => `${name} <- ${rValue(value)}${note ? `  # ${note}` : ''}`;
  return [
    p('DATA_FILE', plan.dataPath),
    p('DATA_SHA256', plan.sha256),
    p('FORMAT', plan.format),
    p('DELIMITER', plan.delimiter),
    p('HEADER', plan.header),
    p('MISSING_TOKENS', plan.missingTokens, 'cells read as missing (after trimming spaces)'),
    p('DECIMAL_COMMA', plan.decimalComma),
    p('THOUSANDS_SEPARATOR', plan.thousandsSeparator),
    p('LABEL', plan.label),
    p('SCREENED_FEATURES', plan.screenedFeatures, 'a row missing any of these is dropped'),
    p('FEATURES', plan.features, 'solved, in this order'),
    p('SOLVER', plan.solver),
    p('PRIORS', plan.priors),
    p('CROSS_VALIDATION', cv),
    p('TOLERANCE', plan.tolerance),
    `EXPECTED <- ${rValue(plan.expected as unknown as PlainValue)}`,
  ].join('\n');
}

export function rScript(plan: ReproductionPlan): string {
  const header = [
    '#!/usr/bin/env Rscript',
    `# Reproduces a fit made by ${commentText(plan.generator)}, with base R and MASS.`,
    `# Data file: ${commentText(rString(plan.fileName))} (SHA-256 ${plan.sha256}); it is only read.`,
    `# Options: ${optionSummary(plan).join(', ')}.`,
    '#',
    '#   Rscript THIS_SCRIPT            prints the figures as JSON',
    '#   Rscript THIS_SCRIPT --check    also compares them with EXPECTED below: exit status 1 and a list',
    '#                                  of differences when the data file or a figure differs beyond',
    '#                                  TOLERANCE (relative; see within_tolerance)',
    '#   Rscript THIS_SCRIPT --data F   reads another copy of the file',
  ];
  return `${header.join('\n')}\n\n${parameters(plan)}\n${BODY}`;
}

const BODY = String.raw`
# ---- reading: the same cells, columns and rows as the reader that made the fit -------------------

fail <- function(message) {
  cat("error: ", message, "\n", sep = "", file = stderr())
  quit(save = "no", status = 2)
}

file_sha256 <- function(path) {
  # R before 4.5 has no SHA-256 of its own: use the system's tool when there is one, else compute
  # it here from the bytes (FIPS 180-4; slow, but exact).
  for (tool in list(c("sha256sum"), c("shasum", "-a", "256"))) {
    if (nzchar(Sys.which(tool[1]))) {
      out <- tryCatch(system2(tool[1], tool[-1], stdin = path, stdout = TRUE, stderr = FALSE), error = function(e) character(0))
      digest <- regmatches(out, regexpr("^[0-9a-f]{64}", out))
      if (length(digest) == 1) return(digest)
    }
  }
  bytes <- readBin(path, "raw", n = file.size(path))
  k <- c(0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
         0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
         0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
         0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
         0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
         0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
         0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
         0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2)
  h <- c(0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19)
  m32 <- 4294967296
  add <- function(...) sum(...) %% m32
  rotr <- function(x, n) x %/% 2^n + (x %% 2^n) * 2^(32 - n)
  xor3 <- function(a, b, c) bitwXor(bitwXor(as_int(a), as_int(b)), as_int(c)) %% m32
  as_int <- function(x) { x <- x %% m32; ifelse(x >= 2^31, x - m32, x) }
  land <- function(a, b) bitwAnd(as_int(a), as_int(b)) %% m32
  lnot <- function(a) m32 - 1 - a
  length_bits <- length(bytes) * 8
  padded <- c(as.integer(bytes), 128L, rep(0L, (55 - length(bytes)) %% 64))
  tail <- numeric(8)
  for (i in 8:1) { tail[i] <- length_bits %% 256; length_bits <- length_bits %/% 256 }
  padded <- c(padded, tail)
  words <- matrix(padded, nrow = 4)
  words <- words[1, ] * 16777216 + words[2, ] * 65536 + words[3, ] * 256 + words[4, ]
  for (block in seq(1, length(words), by = 16)) {
    w <- numeric(64)
    w[1:16] <- words[block:(block + 15)]
    for (t in 17:64) {
      s0 <- xor3(rotr(w[t - 15], 7), rotr(w[t - 15], 18), w[t - 15] %/% 8)
      s1 <- xor3(rotr(w[t - 2], 17), rotr(w[t - 2], 19), w[t - 2] %/% 1024)
      w[t] <- add(w[t - 16], s0, w[t - 7], s1)
    }
    v <- h
    for (t in 1:64) {
      s1 <- xor3(rotr(v[5], 6), rotr(v[5], 11), rotr(v[5], 25))
      choice <- bitwXor(as_int(land(v[5], v[6])), as_int(land(lnot(v[5]), v[7]))) %% m32
      t1 <- add(v[8], s1, choice, k[t], w[t])
      s0 <- xor3(rotr(v[1], 2), rotr(v[1], 13), rotr(v[1], 22))
      majority <- xor3(land(v[1], v[2]), land(v[1], v[3]), land(v[2], v[3]))
      t2 <- add(s0, majority)
      v <- c(add(t1, t2), v[1:3], add(v[4], t1), v[5:7])
    }
    h <- (h + v) %% m32
  }
  paste(sprintf("%04x%04x", as.integer(h %/% 65536), as.integer(h %% 65536)), collapse = "")
}

trim_spaces <- function(text) sub(" +$", "", sub("^ +", "", text))

number_pattern <- function() {
  # [+-]? (digits [. digits?] | . digits) ([eE] [+-]? digits)?; the thousands separator (when set)
  # may stand between two digits of the integer part.
  point <- if (DECIMAL_COMMA) "," else "\\."
  integer <- if (is.null(THOUSANDS_SEPARATOR)) "[0-9]+" else paste0("[0-9]+(?:\\Q", THOUSANDS_SEPARATOR, "\\E[0-9]+)*")
  paste0("^[+-]?(?:", integer, "(?:", point, "[0-9]*)?|", point, "[0-9]+)(?:[eE][+-]?[0-9]+)?$")
}
NUMBER <- number_pattern()

cell_numbers <- function(cells) {
  text <- trim_spaces(cells)
  values <- rep(NaN, length(text))
  missing <- text %in% MISSING_TOKENS
  numeric <- grepl(NUMBER, text, perl = TRUE) & !missing
  plain <- text[numeric]
  if (!is.null(THOUSANDS_SEPARATOR)) plain <- gsub(THOUSANDS_SEPARATOR, "", plain, fixed = TRUE)
  if (DECIMAL_COMMA) plain <- sub(",", ".", plain, fixed = TRUE)
  values[numeric] <- as.numeric(plain)
  infinite <- grepl("^[+-]?(?:inf|infinity)$", text, ignore.case = TRUE, perl = TRUE) & !missing
  values[infinite] <- ifelse(startsWith(text[infinite], "-"), -Inf, Inf)
  values
}

free_name <- function(base, taken) {
  if (!(base %in% taken)) return(base)
  suffix <- 2
  while (paste0(base, "_", suffix) %in% taken) suffix <- suffix + 1
  paste0(base, "_", suffix)
}

header_names <- function(first, count) {
  # Names trimmed of spaces; a blank one becomes column_N, a repeated one gets _2, _3, ...
  if (is.null(first)) return(paste0("column_", seq_len(count)))
  trimmed <- trim_spaces(first)
  taken <- trimmed[trimmed != ""]
  used <- character(0)
  names <- character(length(trimmed))
  for (i in seq_along(trimmed)) {
    final <- trimmed[i]
    if (final == "") final <- free_name(paste0("column_", i), c(taken, used))
    else if (final %in% used) final <- free_name(final, c(taken, used))
    used <- c(used, final)
    names[i] <- final
  }
  names
}

require_columns <- function(names, wanted) {
  absent <- setdiff(wanted, names)
  if (length(absent) > 0) fail(paste0("the data file has no column ", json_string(absent[1])))
}

read_table <- function(path) {
  if (FORMAT == "parquet") {
    reader <- NULL
    for (package in c("arrow", "nanoparquet")) {
      if (requireNamespace(package, quietly = TRUE)) { reader <- getExportedValue(package, "read_parquet"); break }
    }
    if (is.null(reader)) fail("reading Parquet in R needs the arrow or nanoparquet package")
    frame <- as.data.frame(reader(path), stringsAsFactors = FALSE)
    names <- names(frame)
    require_columns(names, c(LABEL, SCREENED_FEATURES))
    raw <- frame[[LABEL]]
    labels <- ifelse(is.na(raw), "", as.character(raw))
    features <- lapply(SCREENED_FEATURES, function(name) as.numeric(frame[[name]]))
    return(list(labels = labels, missing = is.na(raw), features = features))
  }
  frame <- utils::read.table(path, sep = DELIMITER, header = FALSE, colClasses = "character", quote = "\"",
                             comment.char = "", na.strings = character(0), strip.white = FALSE,
                             blank.lines.skip = TRUE, allowEscapes = FALSE, check.names = FALSE,
                             encoding = "UTF-8", fill = FALSE, stringsAsFactors = FALSE)
  # A UTF-8 byte-order mark is not part of the first cell.
  if (nrow(frame) > 0 && startsWith(frame[1, 1], "\ufeff")) frame[1, 1] <- substring(frame[1, 1], 2)
  first <- if (HEADER) as.character(frame[1, ]) else NULL
  names <- header_names(first, ncol(frame))
  body <- if (HEADER) frame[-1, , drop = FALSE] else frame
  require_columns(names, c(LABEL, SCREENED_FEATURES))
  labels <- body[[match(LABEL, names)]]
  features <- lapply(SCREENED_FEATURES, function(name) cell_numbers(body[[match(name, names)]]))
  list(labels = labels, missing = trim_spaces(labels) %in% MISSING_TOKENS, features = features)
}

# JavaScript's \s, as code points: the spaces a label may have around a number and still sort as one.
LABEL_SPACE <- c(9:13, 32, 160, 5760, 8192:8202, 8232, 8233, 8239, 8287, 12288, 65279)
DECIMAL_LABEL <- "^[-+]?(?:[0-9]+(?:\\.[0-9]*)?|\\.[0-9]+)(?:[eE][-+]?[0-9]+)?$"

strip_label_space <- function(label) {
  codes <- utf8ToInt(enc2utf8(label))
  inside <- which(!(codes %in% LABEL_SPACE))
  if (length(inside) == 0) return("")
  intToUtf8(codes[inside[1]:inside[length(inside)]])
}

sort_labels <- function(labels) {
  # By numeric value when every label reads as a decimal number, else by code point (radix order
  # compares UTF-8 bytes, which is code point order).
  labels <- enc2utf8(labels)
  stripped <- vapply(labels, strip_label_space, "", USE.NAMES = FALSE)
  if (length(labels) > 0 && all(grepl(DECIMAL_LABEL, stripped, perl = TRUE))) {
    return(labels[order(as.numeric(stripped), labels, method = "radix")])
  }
  labels[order(labels, method = "radix")]
}

used_rows <- function(path) {
  table <- read_table(path)
  screened <- do.call(cbind, table$features)
  keep <- !table$missing & rowSums(!is.finite(screened)) == 0
  x <- screened[keep, match(FEATURES, SCREENED_FEATURES), drop = FALSE]
  list(x = x, labels = table$labels[keep])
}

# ---- the fit: moments, discriminant eigenvalues, Gaussian classifier -----------------------------

ledoit_wolf <- function(z) {
  # Ledoit & Wolf (2004), as sklearn.covariance.ledoit_wolf(z, assume_centered = TRUE) computes it.
  n <- nrow(z)
  d <- ncol(z)
  covariance <- crossprod(z) / n
  mu <- sum(diag(covariance)) / d
  if (d == 1) return(list(covariance = covariance, shrinkage = 0))
  beta_sum <- sum(crossprod(z^2))
  delta_sum <- sum(crossprod(z)^2) / n^2
  beta <- (beta_sum / n - delta_sum) / (d * n)
  delta <- (delta_sum - 2 * mu * sum(diag(covariance)) + d * mu^2) / d
  beta <- min(beta, delta)
  # A zero or negative estimate means no shrinkage (as in the fit that made this script).
  shrinkage <- if (beta <= 0 || delta <= 0) 0 else beta / delta
  list(covariance = (1 - shrinkage) * covariance + diag(shrinkage * mu, d), shrinkage = shrinkage)
}

fit_model <- function(x, classes, k, intensity = NULL) {
  # Class counts and means, the within-class scatter as solved (Ledoit-Wolf shrunk when SOLVER is
  # shrinkage, with the given intensity if one is given), the discriminant eigenvalues and priors.
  n <- nrow(x)
  d <- ncol(x)
  counts <- tabulate(classes, nbins = k)
  means <- rowsum(x, classes, reorder = TRUE) / counts
  centred <- x - means[classes, , drop = FALSE]
  within <- crossprod(centred)
  shrinkage <- 0
  if (SOLVER == "shrinkage" && !is.null(intensity)) {
    # A cross-validation fold keeps the full fit's intensity; the target mu*I is its own.
    shrinkage <- intensity
    within <- (1 - intensity) * within + diag(intensity * sum(diag(within)) / d, d)
  } else if (SOLVER == "shrinkage") {
    shrunk <- ledoit_wolf(centred)
    within <- n * shrunk$covariance
    shrinkage <- shrunk$shrinkage
  }
  overall <- colSums(means * counts) / n
  offsets <- sweep(means, 2, overall) * sqrt(counts)
  between <- crossprod(offsets)
  # S_B w = lambda S_W w, whitened with the Cholesky factor: S_W = U'U, eigenvalues of U^-T S_B U^-1.
  inverse <- backsolve(chol(within), diag(d))
  whitened <- crossprod(inverse, between %*% inverse)
  eigenvalues <- eigen((whitened + t(whitened)) / 2, symmetric = TRUE, only.values = TRUE)$values[seq_len(min(k - 1, d))]
  priors <- if (PRIORS == "empirical") counts / n else rep(1 / k, k)
  list(n = n, counts = counts, means = means, within = within, eigenvalues = eigenvalues,
       shrinkage = shrinkage, priors = priors)
}

whiten <- function(upper, rows) {
  # rows %*% U^-1 for S = U'U: each row z solves U'z = x.
  matrix(t(backsolve(upper, t(rows), transpose = TRUE)), nrow = nrow(rows))
}

predict_classes <- function(model, x, k) {
  # argmax_c of -1/2 (x - m_c)' S^-1 (x - m_c) + log(prior_c), S = within / (n - K).
  upper <- chol(model$within / (model$n - k))
  white_x <- whiten(upper, x)
  white_means <- whiten(upper, model$means)
  distances <- matrix(vapply(seq_len(k), function(j) rowSums(sweep(white_x, 2, white_means[j, ])^2), numeric(nrow(x))), nrow = nrow(x))
  scores <- -0.5 * distances + matrix(log(model$priors), nrow(x), k, byrow = TRUE)
  max.col(scores, ties.method = "first")
}

training_classes <- function(model, x, classes, k) {
  if (SOLVER != "exact") return(predict_classes(model, x, k))
  # The exact solver's rule is MASS::lda's (covariance S_W/(n - K), the given priors, every
  # discriminant); its tolerance only guards against constant columns, which the fit already removed.
  if (!requireNamespace("MASS", quietly = TRUE)) fail("the MASS package is needed (Debian: r-cran-mass)")
  spread <- sqrt(diag(model$within) / (model$n - k))
  fitted <- MASS::lda(x, grouping = factor(classes, levels = seq_len(k)), prior = model$priors,
                      tol = min(spread) * sqrt(.Machine$double.eps))
  as.integer(as.character(predict(fitted, x)$class))
}

leave_one_out <- function(model, x, classes, k) {
  # Exact leave-one-out by downdating. Without row t of class c (a = n_c/(n_c - 1), v = x_t - m_c):
  # n_c - 1 rows, mean m_c' = (n_c m_c - x_t)/(n_c - 1), within scatter S' = S - zeta a v v' - eps I,
  # covariance S'/(n - 1 - K), empirical priors re-estimated from the remaining rows. Exact solver:
  # zeta = 1, eps = 0. Shrinkage: the left-out fit keeps the full fit's intensity alpha,
  # S' = (1 - alpha) S_raw' + alpha tr(S_raw')/r I, i.e. zeta = 1 - alpha, eps = alpha a |v|^2 / r.
  # With S = U'U and U^-T U^-1 = Q diag(gamma) Q', coordinates y = Q' U^-T x turn S' into
  # diag(h) - zeta a u u' (h = 1 - eps gamma, u = y - ybar_c), inverted by Sherman-Morrison. A row
  # whose S' is not positive definite is classified by the full fit.
  n <- model$n
  counts <- model$counts
  r <- ncol(x)
  upper <- chol(model$within)
  white_x <- whiten(upper, x)
  white_means <- whiten(upper, model$means)
  alpha <- if (SOLVER == "shrinkage") model$shrinkage else 0
  gamma <- rep(0, r)
  if (alpha > 0) {
    inverse <- backsolve(upper, diag(r), transpose = TRUE)
    decomposition <- eigen(inverse %*% t(inverse), symmetric = TRUE)
    gamma <- decomposition$values
    white_x <- white_x %*% decomposition$vectors
    white_means <- white_means %*% decomposition$vectors
  }
  a <- counts[classes] / (counts[classes] - 1)
  eps <- alpha * a * rowSums((x - model$means[classes, , drop = FALSE])^2) / r
  zeta_a <- (1 - alpha) * a
  h <- 1 - outer(eps, gamma)
  u <- white_x - white_means[classes, , drop = FALSE]
  denominator <- 1 - zeta_a * rowSums(u^2 / h)
  usable <- apply(h > 0, 1, all) & denominator > 64 * .Machine$double.eps * max(1, r)
  scores <- matrix(0, nrow(x), k)
  for (j in seq_len(k)) {
    e <- sweep(white_x, 2, white_means[j, ])
    own <- classes == j
    e[own, ] <- a[own] * u[own, , drop = FALSE]
    quadratic <- rowSums(e^2 / h) + zeta_a * rowSums(e * u / h)^2 / denominator
    prior <- if (PRIORS == "empirical") (counts[j] - own) / (n - 1) else rep(1 / k, nrow(x))
    scores[, j] <- -0.5 * (n - 1 - k) * quadratic + log(prior)
  }
  predicted <- max.col(scores, ties.method = "first")
  if (!all(usable)) predicted[!usable] <- predict_classes(model, x[!usable, , drop = FALSE], k)
  predicted
}

fold_of_rows <- function(appearance, folds, seed) {
  # The documented stratified fold generator. For the class whose first appearance in file order is
  # a-th (0-based), a Park-Miller generator x <- 48271 x mod (2^31 - 1) seeded with
  # (seed*7919 + a*104729 + 1) mod (2^31 - 1), or 1 if that is 0. The j-th row of that class lies in
  # block floor(j / folds); each new block draws a permutation of 0..folds-1 by Fisher-Yates
  # (for i = folds-1 down to 1: r = next() mod (i+1); swap perm[i], perm[r]); fold = perm[j mod folds].
  # All products stay below 2^53, so double arithmetic is exact.
  modulus <- 2147483647
  classes <- max(appearance) + 1
  state <- (seed * 7919 + (0:(classes - 1)) * 104729 + 1) %% modulus
  state[state == 0] <- 1
  seen <- integer(classes)
  permutation <- vector("list", classes)
  out <- integer(length(appearance))
  for (row in seq_along(appearance)) {
    a <- appearance[row] + 1
    j <- seen[a]
    if (j %% folds == 0) {
      perm <- 0:(folds - 1)
      for (i in (folds - 1):1) {
        state[a] <- (48271 * state[a]) %% modulus
        r <- state[a] %% (i + 1)
        swap <- perm[i + 1]; perm[i + 1] <- perm[r + 1]; perm[r + 1] <- swap
      }
      permutation[[a]] <- perm
    }
    out[row] <- permutation[[a]][j %% folds + 1]
    seen[a] <- j + 1
  }
  out
}

k_fold <- function(model, x, classes, appearance, k) {
  # Each fold's rows classified by a fit to the other folds' rows (with the shrinkage solver, at
  # the full fit's intensity, as leave-one-out does).
  folds <- CROSS_VALIDATION$folds
  fold <- fold_of_rows(appearance, folds, CROSS_VALIDATION$seed)
  predicted <- integer(nrow(x))
  for (f in 0:(folds - 1)) {
    test <- fold == f
    if (!any(test)) next
    training <- fit_model(x[!test, , drop = FALSE], classes[!test], k, model$shrinkage)
    predicted[test] <- predict_classes(training, x[test, , drop = FALSE], k)
  }
  predicted
}

confusion <- function(truth, predicted, k) {
  matrix <- table(factor(truth, levels = seq_len(k)), factor(predicted, levels = seq_len(k)))
  lapply(seq_len(k), function(i) I(as.numeric(matrix[i, ])))
}

figures <- function(path) {
  rows <- used_rows(path)
  x <- rows$x
  labels <- rows$labels
  order <- sort_labels(unique(labels))
  k <- length(order)
  classes <- match(labels, order)
  appearance <- match(labels, unique(labels)) - 1
  model <- fit_model(x, classes, k)
  trained <- training_classes(model, x, classes, k)
  result <- list(
    rowsUsed = nrow(x),
    labels = I(order),
    counts = I(as.numeric(model$counts)),
    eigenvalues = I(model$eigenvalues),
    explainedRatio = I(model$eigenvalues / sum(model$eigenvalues)),
    shrinkage = model$shrinkage,
    trainingAccuracy = mean(trained == classes),
    confusion = confusion(classes, trained, k),
    crossValidation = NULL
  )
  method <- CROSS_VALIDATION$method
  if (method != "none") {
    predicted <- if (method == "loo") leave_one_out(model, x, classes, k) else k_fold(model, x, classes, appearance, k)
    cv <- list(method = method)
    if (method == "kfold") cv$folds <- CROSS_VALIDATION$folds
    cv$accuracy <- mean(predicted == classes)
    cv$confusion <- confusion(classes, predicted, k)
    result["crossValidation"] <- list(cv)
  }
  result
}

# ---- output and the check ------------------------------------------------------------------------

json_string <- function(text) {
  # Every character outside printable ASCII as a \u escape, so the output is the same in any locale.
  codes <- utf8ToInt(enc2utf8(text))
  parts <- vapply(codes, function(code) {
    if (code == 34) return("\\\"")
    if (code == 92) return("\\\\")
    if (code >= 32 && code < 127) return(intToUtf8(code))
    if (code < 65536) return(sprintf("\\u%04x", code))
    code <- code - 65536
    sprintf("\\u%04x\\u%04x", 55296 + code %/% 1024, 56320 + code %% 1024)
  }, "")
  paste0("\"", paste(parts, collapse = ""), "\"")
}

json_value <- function(value, indent = "") {
  inner <- paste0(indent, "  ")
  if (is.null(value)) return("null")
  if (is.list(value) && !is.null(names(value))) {
    entries <- vapply(names(value), function(key) paste0(inner, json_string(key), ": ", json_value(value[[key]], inner)), "")
    return(paste0("{\n", paste(entries, collapse = ",\n"), "\n", indent, "}"))
  }
  if (is.list(value)) return(paste0("[\n", paste0(inner, vapply(value, json_value, "", inner), collapse = ",\n"), "\n", indent, "]"))
  if (is.character(value)) items <- vapply(value, json_string, "") else items <- sprintf("%.17g", value)
  # A vector of length one is a JSON scalar unless marked as a list of values with I().
  if (length(value) == 1 && !inherits(value, "AsIs")) return(items)
  paste0("[", paste(items, collapse = ", "), "]")
}

within_tolerance <- function(actual, expected, largest) {
  # |actual - expected| <= TOLERANCE * max(|expected|, 1e-6 * largest in its group)
  abs(actual - expected) <= TOLERANCE * pmax(abs(expected), 1e-6 * largest)
}

differences <- function(actual, expected, path) {
  shown <- function(value) gsub("\n *", " ", json_value(value))
  mismatch <- sprintf("%s: expected %s, got %s", path, shown(expected), shown(actual))
  if (is.null(expected)) return(if (is.null(actual)) character(0) else mismatch)
  if (is.list(expected)) {
    if (!is.list(actual) || length(actual) != length(expected)) return(mismatch)
    keys <- names(expected)
    lines <- lapply(seq_along(expected), function(i) {
      if (is.null(keys)) differences(actual[[i]], expected[[i]], sprintf("%s[%d]", path, i - 1))
      else differences(actual[[keys[i]]], expected[[keys[i]]], if (path == "") keys[i] else paste0(path, ".", keys[i]))
    })
    return(unlist(lines))
  }
  if (is.character(expected)) return(if (identical(as.character(actual), expected)) character(0) else mismatch)
  if (!is.numeric(actual) || length(actual) != length(expected)) return(mismatch)
  ok <- within_tolerance(actual, expected, max(abs(expected)))
  if (all(ok)) return(character(0))
  if (length(expected) == 1) return(mismatch)
  bad <- which(!ok)
  sprintf("%s[%d]: expected %.17g, got %.17g", path, bad - 1, expected[bad], actual[bad])
}

main <- function() {
  args <- commandArgs(trailingOnly = TRUE)
  check <- "--check" %in% args
  path <- DATA_FILE
  at <- match("--data", args)
  if (!is.na(at)) {
    if (at == length(args)) fail("--data needs a file")
    path <- args[at + 1]
  }
  if (!file.exists(path)) fail(paste0("cannot read ", json_string(path), ": no such file"))
  result <- figures(path)
  cat(json_value(result), "\n", sep = "")
  if (!check) return(invisible())
  problems <- character(0)
  digest <- file_sha256(path)
  if (digest != DATA_SHA256) problems <- c(problems, sprintf("data file: SHA-256 is %s, the fit read %s", digest, DATA_SHA256))
  problems <- c(problems, differences(result, EXPECTED, ""))
  if (length(problems) > 0) {
    cat(sprintf("check failed (%d differences, tolerance %g relative):\n", length(problems), TOLERANCE), file = stderr())
    cat(paste0("  ", problems, "\n"), sep = "", file = stderr())
    quit(save = "no", status = 1)
  }
  cat(sprintf("check passed: every figure within %g relative of the expected one\n", TOLERANCE), file = stderr())
}

main()
`;
