"""The notebook way to the same answer, for the side-by-side benchmark (bench/bench.ts).

pandas reads the whole table into memory, scikit-learn fits LDA (its default solver, SVD) and
PCA, and cross_val_score gives the cross-validated accuracy with scikit-learn's default
cross-validation (stratified 5-fold). Run with Debian's /usr/bin/python3:

    python3 bench/alternatives/notebook.py FILE LABEL

Prints one JSON line: rows, training and cross-validated accuracy.
"""
import json
import sys

import numpy as np
import pandas as pd
from sklearn.decomposition import PCA
from sklearn.discriminant_analysis import LinearDiscriminantAnalysis
from sklearn.model_selection import cross_val_score

path, label = sys.argv[1], sys.argv[2]
frame = pd.read_parquet(path) if path.endswith(".parquet") else pd.read_csv(path)
y = frame.pop(label).to_numpy()
X = frame.to_numpy(dtype=np.float64)
lda = LinearDiscriminantAnalysis().fit(X, y)
training = lda.score(X, y)
pca = PCA().fit(X)
cv = cross_val_score(LinearDiscriminantAnalysis(), X, y)
print(json.dumps({"rows": int(len(y)), "training": float(training), "crossValidated": float(cv.mean()), "pc1": float(pca.explained_variance_ratio_[0])}))
