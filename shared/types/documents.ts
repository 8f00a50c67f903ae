import type { DocumentKind } from '../utils/documents'

/** A document as the API returns it (the storage key stays on the server). */
export interface ClientDocument {
  id: string
  clientId: string
  kind: DocumentKind
  title: string
  originalName: string
  contentType: string
  sizeBytes: number
  createdAt: string | Date
  updatedAt: string | Date
  uploadedBy: { id: string, name: string } | null
}

export interface DogPhotoInfo {
  dogId: string
  contentType: string
  sizeBytes: number
  updatedAt: string | Date
}
