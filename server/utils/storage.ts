/** Reads an uploaded file's text from the 'uploads' storage mount. */
export async function readUploadText(storageKey: string): Promise<string | null> {
  const value = await useStorage('uploads').getItemRaw(storageKey)
  if (value === null || value === undefined) return null
  if (typeof value === 'string') return value
  return Buffer.from(value as Uint8Array).toString('utf8')
}
