#!/usr/bin/python3
"""Reference figures for the Wine table (and its copy with `ash` times 1e-5) from Debian's
numpy / scipy / scikit-learn.

  /usr/bin/python3 test/reference/scripts/wine_reference.py [OUT_DIR]

Reads test/fixtures/wine/wine.csv and wine-ash-scaled.csv and writes OUT_DIR/wine.python.json
(default test/reference/fixtures): the figures of reference_lib.py for the unscaled table, and the
eigenvalues of the scaled one (which must equal the unscaled ones: λ is invariant under rescaling a
feature).
"""
import os
import sys

from reference_lib import fig, reference, write

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, '..', '..', 'fixtures', 'wine')

if __name__ == '__main__':
    out_dir = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, '..', 'fixtures')
    out = reference(os.path.join(DATA, 'wine.csv'), 'cultivar', pca=False)
    scaled = reference(os.path.join(DATA, 'wine-ash-scaled.csv'), 'cultivar', pca=False, box=False)
    out['ashScaled'] = {
        'eigenvalues': fig('scipy.linalg.eigh(S_B, S_W) on wine-ash-scaled.csv', scaled['eigenvalues']['value']),
        'shrinkageIntensity': fig('sklearn.covariance.ledoit_wolf on the scaled table (scale-dependent: '
                                  'the target μI mixes the features\' units)',
                                  scaled['shrinkage']['intensity']['value']),
    }
    write(out, out_dir, 'wine.python.json')
