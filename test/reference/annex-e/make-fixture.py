"""Planted-identity DICOM sources for Veil's de-identification leak test.

DICOM PS3.15 Annex E (Basic Application Level Confidentiality Profile, Table E.1-1) lists the
attributes that can identify a patient, a clinician, an institution, a device or a date. Rather
than copy that table, this script plants a distinctive value in EVERY attribute of the DICOM data
dictionary (pydicom's copy of PS3.6) whose value representation can hold text, dates, times or
UIDs: a superset of the text-bearing attributes of Table E.1-1. It adds private tags, free text
and nested sequences. Only what an MR image needs to be read (file meta, the Image Pixel module
in group 0028, geometry, SOP Class, Modality, character set) is left as a real value.

The leak test builds reading kits from these sources and scans every byte of every kit file and
every path for every planted value: the expected number of hits is zero.

Run with Debian's python3 (pydicom): /usr/bin/python3 make-fixture.py
Writes: sources/case-{1,2}/{alpha,beta}/slice-{1,2}.dcm and planted.json (values to scan for, each
with its tag: "(gggg,eeee)", "<sequence> > (0010,0020)" or "private").
"""
import json
import os
import sys

import numpy as np
import pydicom
from pydicom.dataset import Dataset, FileDataset, FileMetaDataset
from pydicom.datadict import DicomDictionary
from pydicom.sequence import Sequence
from pydicom.uid import ExplicitVRLittleEndian, MRImageStorage

HERE = os.path.dirname(os.path.abspath(__file__))
TEXT_VRS = {"AE", "AS", "CS", "DA", "DT", "LO", "LT", "PN", "SH", "ST", "TM", "UC", "UI", "UR", "UT"}
KEEP = {  # needed to read the image; numeric geometry is not planted (DS/IS/US carry no text)
    0x00080005,  # Specific Character Set
    0x00080016,  # SOP Class UID
    0x00080060,  # Modality
    0x00020010,  # Transfer Syntax UID (file meta)
}


def planted_value(vr, n):
    if vr == "DA":
        return f"18{n:06d}"
    if vr == "TM":
        return f"235959.{n:06d}"
    if vr == "DT":
        return f"17{n:012d}"
    if vr == "AS":
        return f"{900 + n % 99:03d}Y"[-4:]
    if vr == "UI":
        return f"1.2.826.0.1.3680043.10.543.{n}"
    if vr == "PN":
        return f"VLK{n:05d}^PLANTED"
    return f"VLK{n:05d}"


def planted_dataset():
    ds = Dataset()
    planted = []
    n = 0
    for tag, entry in sorted(DicomDictionary.items()):
        vr, vm, name, retired, keyword = entry
        group = tag >> 16
        if vr not in TEXT_VRS or tag in KEEP or group in (0x0002, 0x0028) or not keyword:
            continue
        if "xx" in f"{tag:08x}":
            continue
        n += 1
        value = planted_value(vr, n)
        setattr(ds, keyword, value)
        if vr != "AS":  # AS values are too short to be distinctive; they are planted but not scanned
            planted.append({"tag": f"({group:04X},{tag & 0xFFFF:04X})", "vr": vr, "value": value})
    # Nested sequences with identity inside.
    for keyword in ("OtherPatientIDsSequence", "ReferencedStudySequence", "RequestAttributesSequence", "ProcedureCodeSequence"):
        n += 1
        item = Dataset()
        item.PatientID = f"VLKSEQ{n:04d}"
        item.CodeMeaning = f"VLKSEQ{n:04d}MEANING"
        setattr(ds, keyword, Sequence([item]))
        planted.append({"tag": f"{keyword} > (0010,0020)", "vr": "LO", "value": f"VLKSEQ{n:04d}"})
    # Private tags: a private creator and free-text values in a private block.
    ds.add_new(0x00090010, "LO", "VLKPRIVATECREATOR")
    ds.add_new(0x00091001, "LO", "VLKPRIVATEVALUE1")
    ds.add_new(0x00091002, "LT", "VLKPRIVATE free text about the patient")
    ds.add_new(0x00291010, "OB", b"VLKPRIVATEBINARY")
    for v in ("VLKPRIVATECREATOR", "VLKPRIVATEVALUE1", "VLKPRIVATE free text about the patient", "VLKPRIVATEBINARY"):
        planted.append({"tag": "private", "vr": "LO", "value": v})
    return ds, planted


def write_slice(path, base, series_uid, instance, z, pixels):
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID = MRImageStorage
    meta.MediaStorageSOPInstanceUID = f"{base.SOPInstanceUID}.{instance}"
    meta.TransferSyntaxUID = ExplicitVRLittleEndian
    ds = FileDataset(path, {}, file_meta=meta, preamble=b"\0" * 128)
    ds.update(base)
    ds.SOPClassUID = MRImageStorage
    ds.SOPInstanceUID = meta.MediaStorageSOPInstanceUID
    ds.SeriesInstanceUID = series_uid
    ds.Modality = "MR"
    ds.InstanceNumber = instance
    ds.ImagePositionPatient = [0.0, 0.0, float(z)]
    ds.ImageOrientationPatient = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0]
    ds.PixelSpacing = [0.9, 0.9]
    ds.SliceThickness = 3.0
    ds.Rows, ds.Columns = pixels.shape
    ds.SamplesPerPixel = 1
    ds.PhotometricInterpretation = "MONOCHROME2"
    ds.BitsAllocated = 16
    ds.BitsStored = 16
    ds.HighBit = 15
    ds.PixelRepresentation = 0
    ds.BurnedInAnnotation = "NO"
    ds.PixelData = pixels.astype("<u2").tobytes()
    ds.is_little_endian = True
    ds.is_implicit_VR = False
    ds.save_as(path, write_like_original=False)


def main():
    base, planted = planted_dataset()
    rng = np.random.default_rng(90210)
    for c in (1, 2):
        for m, method in enumerate(("alpha", "beta")):
            folder = os.path.join(HERE, "sources", f"case-{c}", method)
            os.makedirs(folder, exist_ok=True)
            series_uid = f"{base.SeriesInstanceUID}.{c}{m}"
            for s in (1, 2):
                pixels = rng.integers(0, 1000, size=(16, 16))
                write_slice(os.path.join(folder, f"slice-{s}.dcm"), base, series_uid, s, 3 * s, pixels)
    with open(os.path.join(HERE, "planted.json"), "w") as f:
        json.dump({"generator": f"pydicom {pydicom.__version__}, numpy {np.__version__}, Python {sys.version.split()[0]}",
                   "planted": planted}, f, indent=0)
    print(f"planted {len(planted)} values")


main()
