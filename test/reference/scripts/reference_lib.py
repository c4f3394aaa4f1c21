"""Reference figures for a labelled table, from Debian's numpy / scipy / scikit-learn.

Shared by iris_reference.py and wine_reference.py. Every figure is written as
{"source": "<how it was computed>", "value": <number | list>} so the JSON says where each number
comes from. Conventions are the product's (see src/core/lda.ts): S_W = Σ_i Σ_{t∈C_i} (x_t − m_i)(x_t − m_i)ᵀ,
S_B = Σ_i N_i (m_i − m)(m_i − m)ᵀ, discriminant directions scaled so wᵀ S_W w = n − K, the sign of
each axis chosen so the feature with the largest |standardized coefficient| is positive (ties: lowest
index), classification Gaussian with Σ = S_W/(n − K) and priors. The numpy parts are written here
from those definitions, independently of the TypeScript code.
"""
import json
import math
import os
import platform

import numpy as np
import pandas as pd
import scipy
import scipy.linalg
import scipy.stats
import sklearn
from scipy.spatial.distance import mahalanobis
from sklearn.covariance import ledoit_wolf
from sklearn.decomposition import PCA
from sklearn.discriminant_analysis import LinearDiscriminantAnalysis
from sklearn.feature_selection import f_classif
from sklearn.model_selection import LeaveOneOut, PredefinedSplit, cross_val_predict
from sklearn.preprocessing import StandardScaler

PARK_MILLER_MODULUS = 2 ** 31 - 1


def fig(source, value):
    """One reference figure with its source."""
    return {'source': source, 'value': value}


def tolist(a):
    return np.asarray(a, dtype=float).tolist()


def versions():
    return {
        'python': platform.python_version(),
        'numpy': np.__version__,
        'scipy': scipy.__version__,
        'scikit-learn': sklearn.__version__,
        'pandas': pd.__version__,
    }


def load(path, label):
    """Rows in file order; labels sorted by code point (the product's order for non-numeric labels)."""
    frame = pd.read_csv(path)
    features = [c for c in frame.columns if c != label]
    X = frame[features].to_numpy(dtype=float)
    y_text = frame[label].astype(str).to_numpy()
    labels = sorted(set(y_text))
    y = np.array([labels.index(v) for v in y_text])
    first_appearance = list(dict.fromkeys(y_text))
    return X, y, labels, features, first_appearance, y_text


# ---------------------------------------------------------------------------------------- scatter

def scatters(X, y, K):
    """S_W, S_B, class means (K × d), overall mean, counts — straight from the definitions."""
    m = X.mean(axis=0)
    means = np.array([X[y == c].mean(axis=0) for c in range(K)])
    counts = np.array([np.sum(y == c) for c in range(K)])
    Z = X - means[y]
    S_W = Z.T @ Z
    D = means - m
    S_B = (D.T * counts) @ D
    return S_W, S_B, means, m, counts


def sign_rule(W, S_W, n, K):
    """Flip each column so the feature with the largest |standardized coefficient| is positive."""
    sd = np.sqrt(np.diag(S_W) / (n - K))
    W = W.copy()
    for l in range(W.shape[1]):
        std = W[:, l] * sd
        j = int(np.argmax(np.abs(std)))  # argmax returns the lowest index on ties
        if std[j] < 0:
            W[:, l] = -W[:, l]
    return W


def discriminant(S_W, S_B, n, K, d):
    """scipy.linalg.eigh(S_B, S_W): λ descending, w normalised to wᵀ S_W w = n − K, sign rule."""
    lam, V = scipy.linalg.eigh(S_B, S_W)  # V ᵀ S_W V = I
    order = np.argsort(lam)[::-1]
    k = min(K - 1, d)
    lam = lam[order][:k]
    W = V[:, order][:, :k] * math.sqrt(n - K)
    return lam, sign_rule(W, S_W, n, K)


def pooled_within_correlations(X, y, K, scores):
    """Correlation of each feature with each score, from the within-class-centred rows (features × k)."""
    Xc = X - np.array([X[y == c].mean(axis=0) for c in range(K)])[y]
    Sc = scores - np.array([scores[y == c].mean(axis=0) for c in range(K)])[y]
    cov = Xc.T @ Sc
    return cov / np.sqrt(np.outer((Xc ** 2).sum(axis=0), (Sc ** 2).sum(axis=0)))


# -------------------------------------------------------------------------------- classification

def gaussian_predict(Xtest, means, cov, priors):
    """δ_c = −½ (x − μ_c)ᵀ Σ⁻¹ (x − μ_c) + log π_c (Σ by Cholesky solve, no explicit inverse);
    returns (argmax_c δ_c, posteriors = softmax δ), rows × K."""
    cho = scipy.linalg.cho_factor(cov)
    scores = []
    for c in range(means.shape[0]):
        D = Xtest - means[c]
        q = np.sum(D * scipy.linalg.cho_solve(cho, D.T).T, axis=1)
        scores.append(-0.5 * q + math.log(priors[c]))
    delta = np.array(scores).T
    post = np.exp(delta - delta.max(axis=1, keepdims=True))
    return np.argmax(delta, axis=1), post / post.sum(axis=1, keepdims=True)


def fit_predict(Xtrain, ytrain, Xtest, K, priors='empirical', within=None):
    """Brute-force fit on the training rows: Σ = S_W/(n − K), priors from the training rows."""
    n = Xtrain.shape[0]
    S_W, _, means, _, counts = scatters(Xtrain, ytrain, K)
    if within is not None:
        S_W = within
    pri = counts / n if priors == 'empirical' else np.full(K, 1.0 / K)
    return gaussian_predict(Xtest, means, S_W / (n - K), pri)


def confusion(y, pred, K):
    C = np.zeros((K, K), dtype=int)
    for t, p in zip(y, pred):
        C[t, p] += 1
    return C


def classification_figures(y, pred, K, source, posterior):
    C = confusion(y, pred, K)
    col = C.sum(axis=0)
    return {
        'correct': fig(source, int(np.trace(C))),
        'accuracy': fig(source, float(np.trace(C)) / len(y)),
        'confusion': fig(source + '; rows true class, columns predicted, labels sorted', C.tolist()),
        'precision': fig(source + '; diag / column sum (null when a class is never predicted)',
                         [float(C[c, c]) / col[c] if col[c] else None for c in range(K)]),
        'recall': fig(source + '; diag / row sum', [float(C[c, c]) / C[c].sum() for c in range(K)]),
        'posterior': fig(source + '; posterior probabilities, rows × K, file order', posterior.tolist()),
    }


# ------------------------------------------------------------------------------------------ folds

class FoldAssigner:
    """The product's stratified fold rule (src/core/folds.ts doc comment), re-implemented.

    For the class whose first appearance in file order is a-th (0-based), a Park–Miller
    minimal-standard generator (x ← 48271·x mod (2³¹−1)) seeded with
    ((seed·7919 + a·104729 + 1) mod (2³¹−1)) or 1 if that is 0. The j-th row of that class
    (0-based, file order) lies in block b = floor(j / k); for each new block draw a permutation of
    0..k−1 by Fisher–Yates (for i = k−1 down to 1: r = next() mod (i+1); swap perm[i], perm[r]);
    the row's fold = perm[j mod k].
    """

    def __init__(self, k, seed):
        self.k, self.seed, self.state = k, seed, {}

    def fold_of(self, a):
        st = self.state.get(a)
        if st is None:
            x = (self.seed * 7919 + a * 104729 + 1) % PARK_MILLER_MODULUS
            st = self.state[a] = {'x': x if x != 0 else 1, 'j': 0, 'perm': None}
        j, k = st['j'], self.k
        if j % k == 0:
            perm = list(range(k))
            for i in range(k - 1, 0, -1):
                st['x'] = (48271 * st['x']) % PARK_MILLER_MODULUS
                r = st['x'] % (i + 1)
                perm[i], perm[r] = perm[r], perm[i]
            st['perm'] = perm
        st['j'] = j + 1
        return st['perm'][j % k]


def assign_folds(y_text, first_appearance, k, seed):
    assigner = FoldAssigner(k, seed)
    return np.array([assigner.fold_of(first_appearance.index(v)) for v in y_text])


def kfold_figures(X, y, K, folds, k, seed):
    pred = np.empty_like(y)
    post = np.empty((len(y), K))
    for f in range(k):
        test = folds == f
        pred[test], post[test] = fit_predict(X[~test], y[~test], X[test], K)
    src = (f'brute-force numpy refit per fold (kfold:{k}, seed {seed}; folds from the re-implemented '
           'FoldAssigner rule; Σ = S_W/(n_train − K), empirical priors of the training rows)')
    out = classification_figures(y, pred, K, src, post)
    sk = cross_val_predict(LinearDiscriminantAnalysis(solver='svd'), X, y, cv=PredefinedSplit(folds))
    out['sklearnCorrect'] = fig('sklearn LinearDiscriminantAnalysis(solver="svd") + cross_val_predict('
                                'PredefinedSplit(same folds)): refit per fold', int(np.sum(sk == y)))
    out['foldSizes'] = fig('count of rows per fold from the re-implemented FoldAssigner',
                           [int(np.sum(folds == f)) for f in range(k)])
    out['meanFoldAccuracy'] = fig(src + '; unweighted mean of per-fold accuracies',
                                  float(np.mean([np.mean(pred[folds == f] == y[folds == f]) for f in range(k)])))
    out['folds'] = fig('fold of each row, file order (re-implemented FoldAssigner)', folds.tolist())
    return out


# ------------------------------------------------------------------------------------- statistics

def bartlett_sequential(lam, n, p, K):
    """Bartlett (1947): χ²_j = (n − 1 − (p + K)/2) Σ_{i≥j} ln(1 + λ_i), df = (p − j)(K − 1 − j)."""
    out = []
    for j in range(len(lam)):
        chi2 = (n - 1 - (p + K) / 2) * float(np.sum(np.log1p(lam[j:])))
        df = (p - j) * (K - 1 - j)
        out.append({'chi2': chi2, 'df': df, 'p': float(scipy.stats.chi2.sf(chi2, df))})
    return out


def box_m(X, y, K):
    """Box (1949) test of equal class covariances, written from the textbook formulas.

    ν_i = n_i − 1, S_i the class covariance, S_pl = Σ ν_i S_i / Σ ν_i,
    M = (Σν_i) ln|S_pl| − Σ ν_i ln|S_i|  (= −2 ln of the ratio Π|S_i|^{ν_i/2} / |S_pl|^{Σν_i/2}),
    c1 = (Σ 1/ν_i − 1/Σν_i)(2p² + 3p − 1)/(6(p + 1)(K − 1)),  χ² = (1 − c1) M,  df = (K − 1)p(p + 1)/2;
    c2 = (Σ 1/ν_i² − 1/(Σν_i)²)(p − 1)(p + 2)/(6(K − 1)), a1 = df.
    When c2 > c1²: a2 = (a1 + 2)/(c2 − c1²), b = a1/(1 − c1 − a1/a2), F = M/b on (a1, a2) df
    (Box 1949, Biometrika 36; as in Rencher & Christensen, Methods of Multivariate Analysis, 3rd ed.,
    §7.3.2). When c2 < c1²: a2 = (a1 + 2)/(c1² − c2), b = a2/(1 − c1 + 2/a2), F = a2 M/(a1 (b − M))
    — from memory; that branch is not reached on iris or wine (c2 > c1² there, recorded as c1, c2).
    Log-determinants by numpy.linalg.slogdet.
    """
    p = X.shape[1]
    nu = np.array([np.sum(y == c) - 1 for c in range(K)], dtype=float)
    covs = [np.cov(X[y == c].T) for c in range(K)]
    pooled = sum(v * S for v, S in zip(nu, covs)) / nu.sum()
    logdet = lambda S: np.linalg.slogdet(S)[1]
    M = nu.sum() * logdet(pooled) - sum(v * logdet(S) for v, S in zip(nu, covs))
    c1 = (np.sum(1 / nu) - 1 / nu.sum()) * (2 * p * p + 3 * p - 1) / (6 * (p + 1) * (K - 1))
    df = (K - 1) * p * (p + 1) / 2
    chi2 = (1 - c1) * M
    c2 = (np.sum(1 / nu ** 2) - 1 / nu.sum() ** 2) * (p - 1) * (p + 2) / (6 * (K - 1))
    a1 = df
    if c2 > c1 * c1:
        a2 = (a1 + 2) / (c2 - c1 * c1)
        F = M / (a1 / (1 - c1 - a1 / a2))
    else:
        a2 = (a1 + 2) / (c1 * c1 - c2)
        b = a2 / (1 - c1 + 2 / a2)
        F = a2 * M / (a1 * (b - M))
    return {'M': float(M), 'chi2': float(chi2), 'df': float(df), 'p': float(scipy.stats.chi2.sf(chi2, df)),
            'F': float(F), 'df1': float(a1), 'df2': float(a2), 'pF': float(scipy.stats.f.sf(F, a1, a2)),
            'c1': float(c1), 'c2': float(c2)}


# ------------------------------------------------------------------------------------------- main

def reference(path, label, kfolds=(), seeds=(), pca=True, box=True):
    X, y, labels, features, first_appearance, y_text = load(path, label)
    n, d = X.shape
    K = len(labels)
    S_W, S_B, means, m, counts = scatters(X, y, K)
    lam, W = discriminant(S_W, S_B, n, K, d)
    k = len(lam)
    scores = (X - m) @ W
    sd = np.sqrt(np.diag(S_W) / (n - K))
    eig_src = 'scipy.linalg.eigh(S_B, S_W), S_W and S_B in numpy from their definitions'
    out = {
        'versions': versions(),
        'data': {'file': os.path.basename(path), 'rows': n, 'features': features, 'labels': labels,
                 'counts': counts.tolist(), 'classOfRow': y.tolist()},
        'eigenvalues': fig(eig_src + '; descending, first min(K−1, d)', lam.tolist()),
        'explainedRatio': fig(eig_src + '; λ_i / Σλ', (lam / lam.sum()).tolist()),
        'canonicalCorrelations': fig(eig_src + '; √(λ/(1+λ))', np.sqrt(lam / (1 + lam)).tolist()),
        'coefficients': fig(eig_src + '; columns scaled to wᵀ S_W w = n − K, sign rule applied; features × k',
                            W.tolist()),
        'standardizedCoefficients': fig('coefficients × √(S_W[j,j]/(n − K)) (pooled within-class SD); features × k',
                                        (W * sd[:, None]).tolist()),
        'structure': fig('numpy: Pearson correlation of each feature with each score over the within-class-'
                         'centred rows (scores = (x − m)ᵀ w); features × k',
                         pooled_within_correlations(X, y, K, scores).tolist()),
        'centroids': fig('numpy: class means of the scores (x − m)ᵀ w; classes × k',
                         np.array([scores[y == c].mean(axis=0) for c in range(K)]).tolist()),
        'scores': fig('numpy: (x − m)ᵀ w for every row in file order, sign rule applied; rows × k', scores.tolist()),
        'withinScoreCovariance': fig('numpy: pooled within-class covariance of the scores, divisor n − K (should be I)',
                                     pooled_within_correlations(scores, y, K, scores).tolist()),
        'conditionNumber': fig('numpy.linalg.cond of the pooled within-class correlation matrix '
                               'D^-1/2 S_W D^-1/2 (2-norm)',
                               float(np.linalg.cond(S_W / np.sqrt(np.outer(np.diag(S_W), np.diag(S_W)))))),
    }
    skl = LinearDiscriminantAnalysis(solver='svd').fit(X, y)
    out['sklearnExplainedRatio'] = fig('sklearn LinearDiscriminantAnalysis(solver="svd").explained_variance_ratio_',
                                       skl.explained_variance_ratio_[:k].tolist())
    out['bartlett'] = fig('numpy, Bartlett (1947) sequential χ² from the eigenvalues; p from scipy.stats.chi2.sf',
                          bartlett_sequential(lam, n, d, K))
    if box:
        out['boxM'] = fig('numpy, Box (1949) M from the textbook formulas (Rencher & Christensen §7.3.2); '
                          'M = (Σν) ln|S_pl| − Σ ν_i ln|S_i|; p from scipy.stats', box_m(X, y, K))
    F, p = f_classif(X, y)
    SS_T = ((X - m) ** 2).sum(axis=0)
    out['univariate'] = {
        'F': fig('sklearn.feature_selection.f_classif', F.tolist()),
        'p': fig('sklearn.feature_selection.f_classif', p.tolist()),
        'etaSquared': fig('numpy: between SS / total SS per feature', (np.diag(S_B) / SS_T).tolist()),
    }
    VI = np.linalg.inv(S_W / (n - K))
    out['centroidDistances'] = fig('scipy.spatial.distance.mahalanobis(m_i, m_j, inv(S_W/(n − K)))',
                                   [[mahalanobis(means[i], means[j], VI) for j in range(K)] for i in range(K)])

    # Training predictions.
    pred, post = fit_predict(X, y, X, K)
    out['training'] = classification_figures(y, pred, K, 'numpy Gaussian, Σ = S_W/(n − K), empirical priors', post)
    out['training']['sklearnSvdCorrect'] = fig(
        'sklearn LinearDiscriminantAnalysis(solver="svd").predict (its whitening uses 1/(n − K), as ours)',
        int(np.sum(skl.predict(X) == y)))
    lsqr = LinearDiscriminantAnalysis(solver='lsqr').fit(X, y)
    out['training']['sklearnLsqrCorrect'] = fig(
        'sklearn LinearDiscriminantAnalysis(solver="lsqr").predict (covariance Σ π_i S_i/n_i = S_W/n: divisor n, '
        'not our convention; recorded, not compared)', int(np.sum(lsqr.predict(X) == y)))
    pred_u, post_u = fit_predict(X, y, X, K, priors='uniform')
    out['trainingUniform'] = classification_figures(y, pred_u, K, 'numpy Gaussian, Σ = S_W/(n − K), priors 1/K',
                                                    post_u)

    # Leave-one-out by brute-force refit.
    for key, priors, what in (('leaveOneOut', 'empirical', 'empirical priors of the remaining rows'),
                              ('leaveOneOutUniform', 'uniform', 'priors 1/K')):
        loo = np.empty_like(y)
        post = np.empty((n, K))
        for i in range(n):
            keep = np.arange(n) != i
            p, q = fit_predict(X[keep], y[keep], X[i:i + 1], K, priors=priors)
            loo[i], post[i] = p[0], q[0]
        out[key] = classification_figures(
            y, loo, K, 'brute-force numpy refit without the row: its class mean and S_W recomputed, '
                       'Σ = S_W/(n − 1 − K), ' + what, post)
    sk_loo = cross_val_predict(LinearDiscriminantAnalysis(solver='svd'), X, y, cv=LeaveOneOut())
    out['leaveOneOut']['sklearnCorrect'] = fig(
        'sklearn LinearDiscriminantAnalysis(solver="svd") + cross_val_predict(LeaveOneOut()): full refit per row',
        int(np.sum(sk_loo == y)))
    out['leaveOneOut']['sklearnConfusion'] = fig('same, confusion', confusion(y, sk_loo, K).tolist())

    for kf in kfolds:
        for seed in seeds:
            out[f'kfold{kf}seed{seed}'] = kfold_figures(X, y, K, assign_folds(y_text, first_appearance, kf, seed),
                                                        kf, seed)

    # Ledoit–Wolf on the within-class-centred rows, original scale, and the shrinkage solver built on it.
    Z = X - means[y]
    shrunk_cov, alpha = ledoit_wolf(Z, assume_centered=True)
    S_W_s = n * shrunk_cov
    lam_s, W_s = discriminant(S_W_s, S_B, n, K, d)
    pred_s, post_s = fit_predict(X, y, X, K, within=S_W_s)
    out['shrinkage'] = {
        'intensity': fig('sklearn.covariance.ledoit_wolf(within-class-centred rows, assume_centered=True)[1]',
                         float(alpha)),
        'eigenvalues': fig('scipy.linalg.eigh(S_B, n · ledoit_wolf shrunk covariance)', lam_s.tolist()),
        'explainedRatio': fig('same; λ_i / Σλ', (lam_s / lam_s.sum()).tolist()),
        'training': classification_figures(y, pred_s, K, 'numpy Gaussian, Σ = n · shrunk/(n − K), empirical priors',
                                           post_s),
    }

    if pca:
        out['pca'] = {}
        for scale in ('covariance', 'standardized'):
            Xs = StandardScaler().fit_transform(X) if scale == 'standardized' else X
            p = PCA().fit(Xs)
            comps = p.components_.copy()
            for c in range(comps.shape[0]):  # sign rule: largest |loading| positive (lowest index on ties)
                j = int(np.argmax(np.abs(comps[c])))
                if comps[c, j] < 0:
                    comps[c] = -comps[c]
            sc = (Xs - Xs.mean(axis=0)) @ comps[:2].T
            what = 'sklearn PCA()' if scale == 'covariance' else 'sklearn StandardScaler (SD divisor n) + PCA()'
            out['pca'][scale] = {
                'explainedRatio': fig(what + '.explained_variance_ratio_', p.explained_variance_ratio_.tolist()),
                'loadings': fig(what + '.components_ transposed (features × components, unit length), '
                                'sign: largest |loading| positive', comps.T.tolist()),
                'scores': fig(what + ': first two PC scores of every row, same signs; rows × 2', sc.tolist()),
            }
            if scale == 'standardized':
                out['pca'][scale]['scoresSampleSd'] = fig(
                    'same scores for a scaler with SD divisor n − 1: times √((n − 1)/n)',
                    (sc * math.sqrt((n - 1) / n)).tolist())
    return out


def write(out, out_dir, name):
    os.makedirs(out_dir, exist_ok=True)
    path = os.path.join(out_dir, name)
    with open(path, 'w') as f:
        json.dump(out, f, indent=1, allow_nan=False)
        f.write('\n')
    print('wrote', path)
