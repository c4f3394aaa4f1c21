#!/usr/bin/python3
"""Write the outside datasets the reference suite fits, from the copies Debian's scikit-learn ships.

  /usr/bin/python3 test/reference/scripts/make_iris_csv.py [OUT_ROOT]

Writes, relative to the repository (or to OUT_ROOT, which the live test uses to compare bytes):
  test/fixtures/iris/iris.csv              Iris (sklearn/datasets/data/iris.csv), species named
  test/fixtures/wine/wine.csv              Wine (sklearn/datasets/data/wine_data.csv), classes named
  test/fixtures/wine/wine-ash-scaled.csv   the same Wine table with the `ash` column times 1e-5

The numeric cells are copied as the text sklearn ships them (no float round trip), so the CSVs hold
exactly the shipped values. The scaled column is written with Python's repr (shortest round trip) of
float(cell) * 1e-5; every reference script reads that same file, so all sides fit identical numbers.
Only the two shipped files are read; nothing else is written.
"""
import csv
import os
import sys

import sklearn

HERE = os.path.dirname(os.path.abspath(__file__))
REPO = os.path.normpath(os.path.join(HERE, '..', '..', '..'))
SHIPPED = os.path.join(os.path.dirname(sklearn.__file__), 'datasets', 'data')

IRIS_HEADER = ['sepal_length', 'sepal_width', 'petal_length', 'petal_width', 'species']
# sklearn.datasets.load_wine().feature_names, with the one '/' replaced by '_' so the names are
# plain identifiers in every language the project generates scripts for.
WINE_FEATURES = [
    'alcohol', 'malic_acid', 'ash', 'alcalinity_of_ash', 'magnesium', 'total_phenols', 'flavanoids',
    'nonflavanoid_phenols', 'proanthocyanins', 'color_intensity', 'hue', 'od280_od315_of_diluted_wines',
    'proline',
]
WINE_LABEL = 'cultivar'
SCALED_COLUMN = 'ash'
SCALE = 1e-5


def read_shipped(name):
    """sklearn's layout: first line `n,d,name0,name1,...`, then d values and an integer class code."""
    with open(os.path.join(SHIPPED, name), newline='') as f:
        rows = list(csv.reader(f))
    first = rows[0]
    n, d = int(first[0]), int(first[1])
    class_names = first[2:]
    body = [r for r in rows[1:] if r]
    if len(body) != n or any(len(r) != d + 1 for r in body):
        sys.exit(f'{name}: expected {n} rows of {d + 1} cells')
    return d, class_names, body


def write_csv(path, header, rows):
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, 'w', newline='') as f:
        w = csv.writer(f, lineterminator='\n')
        w.writerow(header)
        w.writerows(rows)
    print('wrote', path, len(rows), 'rows')


def main():
    root = sys.argv[1] if len(sys.argv) > 1 else REPO
    d, names, body = read_shipped('iris.csv')
    assert d == 4 and names == ['setosa', 'versicolor', 'virginica'], names
    write_csv(os.path.join(root, 'test', 'fixtures', 'iris', 'iris.csv'), IRIS_HEADER,
              [r[:d] + [names[int(r[d])]] for r in body])

    d, names, body = read_shipped('wine_data.csv')
    assert d == len(WINE_FEATURES) and names == ['class_0', 'class_1', 'class_2'], names
    rows = [r[:d] + [names[int(r[d])]] for r in body]
    write_csv(os.path.join(root, 'test', 'fixtures', 'wine', 'wine.csv'), WINE_FEATURES + [WINE_LABEL], rows)
    j = WINE_FEATURES.index(SCALED_COLUMN)
    scaled = [r[:j] + [repr(float(r[j]) * SCALE)] + r[j + 1:] for r in rows]
    write_csv(os.path.join(root, 'test', 'fixtures', 'wine', 'wine-ash-scaled.csv'),
              WINE_FEATURES + [WINE_LABEL], scaled)


if __name__ == '__main__':
    main()
