import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import type { DatasetExportSubject } from '../metadata/exports/export-subject'

/** What an anonymous reviewer reads instead of the names of the people and labs behind the data. */
export const HIDDEN = 'Hidden for anonymous review'

/** The dataset record without its depositor, project (the lab's name) or the steward's comment. */
export function anonymiseDataset<T extends DatasetDto>(dto: T): T {
  return {
    ...dto,
    project: { ...dto.project, name: HIDDEN },
    createdBy: null,
    ...('stewardNote' in dto ? { stewardNote: null } : {}),
  }
}

/** Authors become "Author 1", "Author 2"…, with no ORCID or affiliation; funding is left out. */
export function anonymiseMetadata(metadata: DatasetMetadata): DatasetMetadata {
  if (!metadata.study) return metadata
  const { funding: _funding, ...study } = metadata.study
  return {
    ...metadata,
    study: {
      ...study,
      ...(study.authors
        ? { authors: study.authors.map((_a, i) => ({ name: `Author ${i + 1}` })) }
        : {}),
    },
  }
}

export function anonymiseExport(subject: DatasetExportSubject): DatasetExportSubject {
  return {
    ...subject,
    depositorName: null,
    projectName: HIDDEN,
    metadata: anonymiseMetadata(subject.metadata),
  }
}
