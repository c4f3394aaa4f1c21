#!/usr/bin/python3
"""Reference figures for the Iris table from Debian's numpy / scipy / scikit-learn.

  /usr/bin/python3 test/reference/scripts/iris_reference.py [OUT_DIR]

Reads test/fixtures/iris/iris.csv and writes OUT_DIR/iris.python.json (default
test/reference/fixtures). See reference_lib.py for how each figure is computed.
"""
import os
import sys

from reference_lib import reference, write

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, '..', '..', 'fixtures', 'iris', 'iris.csv')

if __name__ == '__main__':
    out_dir = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, '..', 'fixtures')
    write(reference(DATA, 'species', kfolds=(5, 10), seeds=(1, 7)), out_dir, 'iris.python.json')
