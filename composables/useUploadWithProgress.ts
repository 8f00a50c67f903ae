// Sends a multipart upload with progress (fetch cannot report upload progress; XMLHttpRequest can).
// A failure rejects with the same shape as an ofetch error, so apiErrorMessage / apiFieldErrors read it.

export interface UploadFailure { statusCode?: number, statusMessage?: string, data?: { message?: string, data?: { fieldErrors?: Record<string, string> } } }

export function uploadWithProgress<T>(url: string, opts: { method?: 'POST' | 'PUT', body: FormData, onProgress?: (fraction: number) => void }): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open(opts.method ?? 'POST', url)
    xhr.responseType = 'text'
    xhr.setRequestHeader('accept', 'application/json')
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && opts.onProgress) opts.onProgress(e.loaded / e.total)
    }
    xhr.onload = () => {
      let body: unknown = null
      try { body = xhr.responseText ? JSON.parse(xhr.responseText) : null }
      catch { /* not JSON */ }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as T)
      else {
        const data = (body && typeof body === 'object' ? body : { message: `The upload was refused (${xhr.status}).` }) as UploadFailure['data']
        reject({ statusCode: xhr.status, statusMessage: xhr.statusText, data } satisfies UploadFailure)
      }
    }
    xhr.onerror = () => reject({ data: { message: 'The upload did not reach Forescent. Check your connection and try again.' } } satisfies UploadFailure)
    xhr.onabort = () => reject({ data: { message: 'The upload was cancelled.' } } satisfies UploadFailure)
    xhr.send(opts.body)
  })
}
