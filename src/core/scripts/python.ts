/**
 * The Python reproduction script: pandas reads the file, NumPy/SciPy solve the discriminant
 * problem, scikit-learn's `ledoit_wolf` gives the shrinkage (the same estimator as ours), and the
 * classifier, leave-one-out and k-fold are written out from their definitions so a reader can check
 * each step. Printed figures are JSON; `--check` compares them with the figures written at the top.
 *
 * Why not scikit-learn's LinearDiscriminantAnalysis for the predictions: its pooled covariance
 * divides by n (a prior-weighted mean of per-class covariances), ours by n − K as in the textbook
 * Gaussian rule, and the scale of the covariance moves borderline rows.
 */
import { pythonValue, type PlainValue } from './literals';
import { commentText, pythonString } from './quoting';
import { optionSummary, type ReproductionPlan } from './plan';

function parameters(plan: ReproductionPlan): string {
  const cv: PlainValue = plan.cv.method === 'kfold' ? { method: 'kfold', folds: plan.cv.folds, seed: plan.cv.seed } : { method: plan.cv.method };
  const p = (name: string, value: PlainValue, note?: string) => `${name} = ${pythonValue(value)}${note ? `  # ${note}` : ''}`;
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
    `EXPECTED = ${pythonValue(plan.expected as unknown as PlainValue)}`,
  ].join('\n');
}

export function pythonScript(plan: ReproductionPlan): string {
  const header = [
    '#!/usr/bin/env python3',
    `# Reproduces a fit made by ${commentText(plan.generator)}, with pandas, NumPy/SciPy and scikit-learn.`,
    `# Data file: ${commentText(pythonString(plan.fileName))} (SHA-256 ${plan.sha256}); it is only read.`,
    `# Options: ${optionSummary(plan).join(', ')}.`,
    '#',
    '#   python3 THIS_SCRIPT            prints the figures as JSON',
    '#   python3 THIS_SCRIPT --check    also compares them with EXPECTED below: exit status 1 and a list',
    '#                                  of differences when the data file or a figure differs beyond',
    '#                                  TOLERANCE (relative; see within_tolerance)',
    '#   python3 THIS_SCRIPT --data F   reads another copy of the file',
  ];
  return `${header.join('\n')}\nimport argparse\nimport hashlib\nimport json\nimport re\nimport sys\n\nimport numpy as np\nimport pandas as pd\nimport scipy.linalg\nfrom sklearn.covariance import ledoit_wolf\n\n${parameters(plan)}\n${BODY}`;
}

/** The fixed part: reading, fitting, cross-validation, output and the check. */
const BODY = String.raw`

# ---- reading: the same cells, columns and rows as the reader that made the fit -------------------

def fail(message):
    print(f'error: {message}', file=sys.stderr)
    sys.exit(2)


def file_sha256(path):
    digest = hashlib.sha256()
    with open(path, 'rb') as stream:
        for block in iter(lambda: stream.read(1 << 20), b''):
            digest.update(block)
    return digest.hexdigest()


def number_pattern():
    """[+-]? (digits [. digits?] | . digits) ([eE] [+-]? digits)?, ASCII digits only; the thousands
    separator (when set) may stand between two digits of the integer part."""
    point = ',' if DECIMAL_COMMA else r'\.'
    integer = '[0-9]+' if THOUSANDS_SEPARATOR is None else '[0-9]+(?:' + re.escape(THOUSANDS_SEPARATOR) + '[0-9]+)*'
    return re.compile(r'[+-]?(?:' + integer + '(?:' + point + '[0-9]*)?|' + point + '[0-9]+)(?:[eE][+-]?[0-9]+)?')


NUMBER = number_pattern()
INFINITY = re.compile(r'[+-]?(?:inf|infinity)', re.IGNORECASE)


def cell_numbers(cells):
    """A column of cell texts as floats: missing tokens and text become NaN, inf/infinity ±inf."""
    text = cells.astype(str).str.strip(' ')
    values = np.full(len(text), np.nan)
    missing = text.isin(MISSING_TOKENS).to_numpy()
    numeric = text.str.fullmatch(NUMBER).to_numpy(dtype=bool) & ~missing
    plain = text[numeric]
    if THOUSANDS_SEPARATOR is not None:
        plain = plain.str.replace(THOUSANDS_SEPARATOR, '', regex=False)
    if DECIMAL_COMMA:
        plain = plain.str.replace(',', '.', regex=False)
    # Python's float() of a decimal string (what astype(float) applies) is correctly rounded, as
    # JavaScript's Number() is.
    values[numeric] = plain.astype(float).to_numpy()
    infinite = text.str.fullmatch(INFINITY).to_numpy(dtype=bool) & ~missing
    values[infinite] = np.where(text[infinite].str.startswith('-'), -np.inf, np.inf)
    return values


def free_name(base, taken, used):
    if base not in taken and base not in used:
        return base
    suffix = 2
    while f'{base}_{suffix}' in taken or f'{base}_{suffix}' in used:
        suffix += 1
    return f'{base}_{suffix}'


def header_names(first, count):
    """Names trimmed of spaces; a blank one becomes column_N, a repeated one gets _2, _3, ..."""
    if first is None:
        return [f'column_{i + 1}' for i in range(count)]
    trimmed = [cell.strip(' ') for cell in first]
    taken = {name for name in trimmed if name != ''}
    used, names = set(), []
    for i, name in enumerate(trimmed):
        final = name
        if name == '':
            final = free_name(f'column_{i + 1}', taken, used)
        elif name in used:
            final = free_name(name, taken, used)
        used.add(final)
        names.append(final)
    return names


def read_table(path):
    """(column names, label texts, label-missing mask, {feature: values}) in file order."""
    if FORMAT == 'parquet':
        try:
            frame = pd.read_parquet(path)
        except ImportError as error:
            fail(f'reading Parquet with pandas needs pyarrow or fastparquet installed ({error})')
        names = [str(name) for name in frame.columns]
        columns = {name: frame.iloc[:, i] for i, name in enumerate(names)}
        require(names, [LABEL] + SCREENED_FEATURES)
        raw_labels = columns[LABEL]
        missing = raw_labels.isna().to_numpy()
        labels = np.array([parquet_label(v) for v in raw_labels], dtype=object)
        features = {name: pd.to_numeric(columns[name]).astype(float).to_numpy() for name in SCREENED_FEATURES}
        return labels, missing, features
    frame = pd.read_csv(path, sep=DELIMITER, header=None, dtype=str, na_filter=False, keep_default_na=False,
                        skip_blank_lines=True, encoding='utf-8-sig', quotechar='"', doublequote=True)
    names = header_names([str(c) for c in frame.iloc[0]] if HEADER else None, frame.shape[1])
    body = frame.iloc[1:] if HEADER else frame
    require(names, [LABEL] + SCREENED_FEATURES)
    label_cells = body.iloc[:, names.index(LABEL)].astype(str)
    missing = label_cells.str.strip(' ').isin(MISSING_TOKENS).to_numpy()
    labels = label_cells.to_numpy(dtype=object)
    features = {name: cell_numbers(body.iloc[:, names.index(name)]) for name in SCREENED_FEATURES}
    return labels, missing, features


def parquet_label(value):
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value)


def require(names, wanted):
    absent = [name for name in wanted if name not in names]
    if absent:
        fail(f'the data file has no column {absent[0]!r} (columns: {names!r})')


# JavaScript's \s: the spaces a label may have around a number and still sort as one.
LABEL_SPACE = '[\t\n\v\f\r \u00a0\u1680\u2000-\u200a\u2028\u2029\u202f\u205f\u3000\ufeff]'
DECIMAL_LABEL = re.compile(LABEL_SPACE + r'*[-+]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][-+]?[0-9]+)?' + LABEL_SPACE + '*')
LABEL_PADDING = re.compile('^' + LABEL_SPACE + '+|' + LABEL_SPACE + '+$')


def sort_labels(labels):
    """By numeric value when every label reads as a decimal number, else by code point."""
    if labels and all(DECIMAL_LABEL.fullmatch(label) for label in labels):
        return sorted(labels, key=lambda label: (float(LABEL_PADDING.sub('', label)), label))
    return sorted(labels)


def used_rows(path):
    labels, missing, features = read_table(path)
    screened = np.column_stack([features[name] for name in SCREENED_FEATURES])
    keep = ~missing & np.isfinite(screened).all(axis=1)
    x = screened[keep][:, [SCREENED_FEATURES.index(name) for name in FEATURES]]
    return x, labels[keep]


# ---- the fit: moments, discriminant eigenvalues, Gaussian classifier -----------------------------

def fit(x, classes, k, intensity=None):
    """Class counts and means, the within-class scatter as solved (Ledoit-Wolf shrunk when SOLVER is
    shrinkage, with the given intensity if one is given), the discriminant eigenvalues and the
    priors. classes: 0..k-1 per row."""
    n, d = x.shape
    counts = np.bincount(classes, minlength=k).astype(float)
    means = np.zeros((k, d))
    np.add.at(means, classes, x)
    means /= counts[:, None]
    centred = x - means[classes]
    within = centred.T @ centred
    shrinkage = 0.0
    if SOLVER == 'shrinkage' and intensity is not None:
        # A cross-validation fold keeps the full fit's intensity; the target mu*I is its own.
        shrinkage = intensity
        within = (1 - intensity) * within + intensity * np.trace(within) / d * np.eye(d)
    elif SOLVER == 'shrinkage':
        # Ledoit & Wolf (2004) on the within-class-centred rows, original scale, towards mu*I.
        covariance, shrinkage = ledoit_wolf(centred, assume_centered=True)
        if not shrinkage > 0:
            # A zero or negative estimate means no shrinkage (as in the fit that made this script).
            covariance, shrinkage = centred.T @ centred / n, 0.0
        within = n * covariance
    overall = counts @ means / n
    offsets = (means - overall) * np.sqrt(counts)[:, None]
    between = offsets.T @ offsets
    eigenvalues = scipy.linalg.eigh(between, within, eigvals_only=True)[::-1][:min(k - 1, d)]
    priors = counts / n if PRIORS == 'empirical' else np.full(k, 1.0 / k)
    return {'n': n, 'counts': counts, 'means': means, 'within': within, 'eigenvalues': eigenvalues,
            'shrinkage': float(shrinkage), 'priors': priors}


def predict(model, x, k):
    """argmax_c of -1/2 (x - m_c)' S^-1 (x - m_c) + log(prior_c), S = within / (n - K)."""
    factor = np.linalg.cholesky(model['within'] / (model['n'] - k))
    white_x = scipy.linalg.solve_triangular(factor, x.T, lower=True).T
    white_means = scipy.linalg.solve_triangular(factor, model['means'].T, lower=True).T
    distances = np.stack([((white_x - m) ** 2).sum(axis=1) for m in white_means], axis=1)
    return np.argmax(-0.5 * distances + np.log(model['priors']), axis=1)


def leave_one_out(model, x, classes, k):
    """Exact leave-one-out by downdating. Without row t of class c (a = n_c/(n_c - 1), v = x_t - m_c):
    n_c - 1 rows, mean m_c' = (n_c m_c - x_t)/(n_c - 1), within scatter
    S' = S - zeta a v v' - eps I, covariance S'/(n - 1 - K), empirical priors re-estimated from the
    remaining rows. Exact solver: zeta = 1, eps = 0. Shrinkage: the left-out fit keeps the full
    fit's intensity alpha, S' = (1 - alpha) S_raw' + alpha tr(S_raw')/r I, i.e. zeta = 1 - alpha,
    eps = alpha a |v|^2 / r. With S = B B', B^-1 B^-T = Q diag(gamma) Q', coordinates
    y = Q' B^-1 x turn S' into diag(h) - zeta a u u' (h = 1 - eps gamma, u = y - ybar_c), inverted by
    Sherman-Morrison. A row whose S' is not positive definite is classified by the full fit."""
    n = model['n']
    counts = model['counts']
    r = x.shape[1]
    factor = np.linalg.cholesky(model['within'])
    white_x = scipy.linalg.solve_triangular(factor, x.T, lower=True).T
    white_means = scipy.linalg.solve_triangular(factor, model['means'].T, lower=True).T
    alpha = model['shrinkage'] if SOLVER == 'shrinkage' else 0.0
    gamma = np.zeros(r)
    if alpha > 0:
        inverse = scipy.linalg.solve_triangular(factor, np.eye(r), lower=True)
        gamma, basis = np.linalg.eigh(inverse @ inverse.T)
        white_x, white_means = white_x @ basis, white_means @ basis
    a = counts[classes] / (counts[classes] - 1)
    eps = alpha * a * ((x - model['means'][classes]) ** 2).sum(axis=1) / r
    zeta_a = (1 - alpha) * a
    h = 1 - eps[:, None] * gamma[None, :]
    u = white_x - white_means[classes]
    denominator = 1 - zeta_a * (u ** 2 / h).sum(axis=1)
    usable = (h > 0).all(axis=1) & (denominator > 64 * np.finfo(float).eps * max(1, r))
    scores = np.empty((len(x), k))
    with np.errstate(divide='ignore', invalid='ignore'):
        for j in range(k):
            e = white_x - white_means[j]
            own = classes == j
            e[own] = a[own, None] * u[own]
            quadratic = (e ** 2 / h).sum(axis=1) + zeta_a * ((e * u / h).sum(axis=1)) ** 2 / denominator
            prior = (counts[j] - own) / (n - 1) if PRIORS == 'empirical' else np.full(len(x), 1.0 / k)
            scores[:, j] = -0.5 * (n - 1 - k) * quadratic + np.log(prior)
    predicted = np.argmax(scores, axis=1)
    if not usable.all():
        predicted[~usable] = predict(model, x[~usable], k)
    return predicted


def fold_of_rows(classes_by_appearance, folds, seed):
    """The documented stratified fold generator. For the class whose first appearance in file order
    is a-th (0-based), a Park-Miller generator x <- 48271 x mod (2^31 - 1) seeded with
    (seed*7919 + a*104729 + 1) mod (2^31 - 1), or 1 if that is 0. The j-th row of that class lies in
    block floor(j / folds); each new block draws a permutation of 0..folds-1 by Fisher-Yates
    (for i = folds-1 down to 1: r = next() mod (i+1); swap perm[i], perm[r]); fold = perm[j mod folds]."""
    modulus = 2147483647
    state, seen, permutation = {}, {}, {}
    out = np.empty(len(classes_by_appearance), dtype=int)
    for row, a in enumerate(classes_by_appearance):
        if a not in state:
            start = (seed * 7919 + a * 104729 + 1) % modulus
            state[a], seen[a] = (start if start != 0 else 1), 0
        j = seen[a]
        if j % folds == 0:
            perm = list(range(folds))
            for i in range(folds - 1, 0, -1):
                state[a] = 48271 * state[a] % modulus
                r = state[a] % (i + 1)
                perm[i], perm[r] = perm[r], perm[i]
            permutation[a] = perm
        out[row] = permutation[a][j % folds]
        seen[a] = j + 1
    return out


def k_fold(model, x, classes, appearance, k):
    """Each fold's rows classified by a fit to the other folds' rows (with the shrinkage solver,
    at the full fit's intensity, as leave-one-out does)."""
    folds = CROSS_VALIDATION['folds']
    fold = fold_of_rows(appearance, folds, CROSS_VALIDATION['seed'])
    predicted = np.empty(len(x), dtype=int)
    for f in range(folds):
        test = fold == f
        if not test.any():
            continue
        training = fit(x[~test], classes[~test], k, model['shrinkage'])
        predicted[test] = predict(training, x[test], k)
    return predicted


def confusion(truth, predicted, k):
    matrix = np.zeros((k, k), dtype=int)
    np.add.at(matrix, (truth, predicted), 1)
    return matrix


def figures(path):
    x, labels = used_rows(path)
    order = sort_labels(sorted(set(labels)))
    k = len(order)
    index = {label: i for i, label in enumerate(order)}
    classes = np.array([index[label] for label in labels], dtype=int)
    first_seen = {}
    for label in labels:
        first_seen.setdefault(label, len(first_seen))
    appearance = [first_seen[label] for label in labels]
    model = fit(x, classes, k)
    trained = predict(model, x, k)
    result = {
        'rowsUsed': int(len(x)),
        'labels': order,
        'counts': [int(c) for c in model['counts']],
        'eigenvalues': [float(v) for v in model['eigenvalues']],
        'explainedRatio': [float(v) for v in model['eigenvalues'] / model['eigenvalues'].sum()],
        'shrinkage': model['shrinkage'],
        'trainingAccuracy': float((trained == classes).mean()),
        'confusion': confusion(classes, trained, k).tolist(),
        'crossValidation': None,
    }
    method = CROSS_VALIDATION['method']
    if method != 'none':
        cv = leave_one_out(model, x, classes, k) if method == 'loo' else k_fold(model, x, classes, appearance, k)
        result['crossValidation'] = {'method': method, **({'folds': CROSS_VALIDATION['folds']} if method == 'kfold' else {}),
                                     'accuracy': float((cv == classes).mean()), 'confusion': confusion(classes, cv, k).tolist()}
    return result


# ---- output and the check ------------------------------------------------------------------------

def within_tolerance(actual, expected, largest):
    """|actual - expected| <= TOLERANCE * max(|expected|, 1e-6 * largest in its group)."""
    return abs(actual - expected) <= TOLERANCE * max(abs(expected), 1e-6 * largest)


def differences(actual, expected, path=''):
    if isinstance(expected, dict):
        if not isinstance(actual, dict):
            return [f'{path}: expected {expected!r}, got {actual!r}']
        return [line for key in expected for line in differences(actual.get(key), expected[key], f'{path}.{key}' if path else key)]
    if isinstance(expected, list):
        if not isinstance(actual, list) or len(actual) != len(expected):
            return [f'{path}: expected {expected!r}, got {actual!r}']
        numbers = [abs(v) for v in expected if isinstance(v, (int, float)) and not isinstance(v, bool)]
        largest = max(numbers, default=0.0)
        lines = []
        for i, (a, e) in enumerate(zip(actual, expected)):
            if isinstance(e, (int, float)) and not isinstance(e, bool) and isinstance(a, (int, float)):
                if not within_tolerance(a, e, largest):
                    lines.append(f'{path}[{i}]: expected {e!r}, got {a!r}')
            else:
                lines.extend(differences(a, e, f'{path}[{i}]'))
        return lines
    if isinstance(expected, (int, float)) and not isinstance(expected, bool) and isinstance(actual, (int, float)):
        return [] if within_tolerance(actual, expected, abs(expected)) else [f'{path}: expected {expected!r}, got {actual!r}']
    return [] if actual == expected else [f'{path}: expected {expected!r}, got {actual!r}']


def main():
    parser = argparse.ArgumentParser(description='Reproduce a Scatterwise fit.')
    parser.add_argument('--check', action='store_true', help='compare with the expected figures; exit 1 on a difference')
    parser.add_argument('--data', default=DATA_FILE, help='the data file (default: the one the fit used)')
    args = parser.parse_args()
    try:
        result = figures(args.data)
    except OSError as error:
        fail(f'cannot read {args.data!r}: {error}')
    print(json.dumps(result, indent=2, ensure_ascii=False))
    if not args.check:
        return
    problems = []
    digest = file_sha256(args.data)
    if digest != DATA_SHA256:
        problems.append(f'data file: SHA-256 is {digest}, the fit read {DATA_SHA256}')
    problems += differences(result, EXPECTED)
    if problems:
        print(f'check failed ({len(problems)} differences, tolerance {TOLERANCE} relative):', file=sys.stderr)
        for line in problems:
            print(f'  {line}', file=sys.stderr)
        sys.exit(1)
    print(f'check passed: every figure within {TOLERANCE} relative of the expected one', file=sys.stderr)


if __name__ == '__main__':
    main()
`;
