import type { DealFile } from '#shared/types/deals'

export type DealUploadKind = 'attachment' | 'photo' | 'proof' | 'pull'

/** Uploads files one by one with a progress figure (XMLHttpRequest reports upload progress; fetch does not). */
export function useDealUpload(kind: DealUploadKind) {
  const files = ref<DealFile[]>([])
  const progress = ref<number | null>(null)
  const error = ref<string | null>(null)

  function send(file: File): Promise<DealFile> {
    return new Promise((resolve, reject) => {
      const xhr = new XMLHttpRequest()
      xhr.open('POST', `/api/attachments?kind=${kind}&name=${encodeURIComponent(file.name)}`)
      xhr.setRequestHeader('content-type', file.type || 'application/octet-stream')
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) progress.value = Math.round((e.loaded / e.total) * 100)
      }
      xhr.onload = () => {
        const body = (() => {
          try {
            return JSON.parse(xhr.responseText)
          }
          catch {
            return null
          }
        })()
        if (xhr.status >= 200 && xhr.status < 300 && body) resolve(body as DealFile)
        else reject(new Error(body?.message ?? `The upload failed (${xhr.status}).`))
      }
      xhr.onerror = () => reject(new Error('The upload was interrupted; check the connection and try again.'))
      xhr.send(file)
    })
  }

  async function add(list: FileList | File[] | null) {
    error.value = null
    for (const file of Array.from(list ?? [])) {
      try {
        progress.value = 0
        files.value.push(await send(file))
      }
      catch (e) {
        error.value = `${file.name}: ${(e as Error).message}`
      }
      finally {
        progress.value = null
      }
    }
  }

  function remove(id: number) {
    files.value = files.value.filter(f => f.id !== id)
  }

  return { files, progress, error, add, remove, ids: computed(() => files.value.map(f => f.id)) }
}
