"""What pydicom and nibabel read from the files Veil's writers made (write-samples.ts).
Run: /usr/bin/python3 make-expected.py > expected.json"""
import glob
import json
import os
import sys

import nibabel as nib
import numpy as np
import pydicom

here = os.path.dirname(os.path.abspath(__file__))
slices = []
for f in sorted(glob.glob(os.path.join(here, "dicom", "*.dcm"))):
    d = pydicom.dcmread(f)
    values = d.pixel_array.astype(np.float64) * float(d.RescaleSlope) + float(d.RescaleIntercept)
    slices.append({"position": [float(x) for x in d.ImagePositionPatient],
                   "orientation": [float(x) for x in d.ImageOrientationPatient],
                   "pixel_spacing": [float(x) for x in d.PixelSpacing],
                   "rows": int(d.Rows), "columns": int(d.Columns),
                   "values": values.ravel().tolist(),
                   "transfer_syntax": str(d.file_meta.TransferSyntaxUID)})
img = nib.load(os.path.join(here, "sample.nii"))
data = np.asarray(img.get_fdata())  # (i, j, k) = (column, row, slice)
print(json.dumps({
    "generator": f"pydicom {pydicom.__version__}, nibabel {nib.__version__}, numpy {np.__version__}, Python {sys.version.split()[0]}",
    "dicom": slices,
    "nifti": {"shape": list(data.shape), "affine": img.affine.tolist(), "axcodes": list(nib.aff2axcodes(img.affine)),
              "values_slice_row_column": np.transpose(data, (2, 1, 0)).ravel().tolist()},
}))
