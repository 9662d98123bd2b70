/**
 * Writes the sample files that make-expected.py reads with pydicom and nibabel:
 *   npx tsx test/reference/writers/write-samples.ts
 * The volume is the one test/unit/writers.test.ts writes again and compares.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeDicomSeries } from '../../../app/images/dicom-write.ts';
import { writeNifti1 } from '../../../app/images/nifti-write.ts';
import { sampleVolume } from './sample-volume.ts';

const here = import.meta.dirname;
mkdirSync(join(here, 'dicom'), { recursive: true });
writeDicomSeries(sampleVolume(), { studyUid: '2.25.1', seriesUid: '2.25.2', frameOfReferenceUid: '2.25.3', seriesDescription: 'sample' })
  .forEach((b, i) => writeFileSync(join(here, 'dicom', `slice-${i + 1}.dcm`), b));
writeFileSync(join(here, 'sample.nii'), writeNifti1(sampleVolume(), 'sample'));
