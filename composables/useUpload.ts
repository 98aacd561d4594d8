/** What an upload came back with: the status, the JSON body (or the server's refusal), and a message for people. */
export interface UploadAnswer<T> {
  ok: boolean
  status: number
  body: T | null
  message: string
  data: Record<string, unknown> | null
}

/**
 * The one upload of the pages: posts a form (build photos and pulls) or a file as the raw body (deal
 * files) with XMLHttpRequest so the page can show how much has been sent (fetch cannot report upload
 * progress without streaming bodies). `progress` runs from 0 to 1 (`<UploadProgress>` draws it). One
 * upload at a time per instance.
 */
export function useUpload() {
  const progress = ref(0)
  const active = ref(false)

  function send<T>(url: string, body: FormData | Blob, method: 'POST' | 'PUT' = 'POST'): Promise<UploadAnswer<T>> {
    active.value = true
    progress.value = 0
    return new Promise((resolve) => {
      const xhr = new XMLHttpRequest()
      xhr.open(method, url)
      xhr.setRequestHeader('accept', 'application/json')
      // A form sets its own multipart type; a bare file goes as its bytes.
      if (!(body instanceof FormData)) xhr.setRequestHeader('content-type', body.type || 'application/octet-stream')
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) progress.value = e.loaded / e.total
      }
      xhr.onload = () => {
        active.value = false
        let answer: Record<string, unknown> | null = null
        try {
          answer = xhr.responseText ? JSON.parse(xhr.responseText) : null
        }
        catch {
          answer = null
        }
        const ok = xhr.status >= 200 && xhr.status < 300
        // Only a file the server took is "all sent"; a refused one goes back to nothing.
        progress.value = ok ? 1 : 0
        const message = ok ? '' : String(answer?.message ?? `The upload was refused (${xhr.status}).`)
        resolve({ ok, status: xhr.status, body: ok ? (answer as T) : null, message, data: ok ? null : (answer?.data as Record<string, unknown>) ?? null })
      }
      xhr.onerror = () => {
        active.value = false
        resolve({ ok: false, status: 0, body: null, message: 'The upload did not reach the server; check the connection and try again.', data: null })
      }
      xhr.send(body)
    })
  }

  return { progress, active, send }
}
