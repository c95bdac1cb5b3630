// Uploads a file with XMLHttpRequest, whose upload progress events fetch() does not offer, and
// turns refusals into the same ApiError the rest of the client uses.
import { apiErrorSchema } from "@shared/schemas/common";
import { ApiError, NETWORK_ERROR_CODE } from "./api";

export interface UploadProgress {
  loaded: number;
  total: number;
}

export function uploadWithProgress<T>(path: string, field: string, file: File, onProgress: (p: UploadProgress) => void, signal?: AbortSignal): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api${path}`);
    xhr.setRequestHeader("Accept", "application/json");
    xhr.withCredentials = true;
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) onProgress({ loaded: event.loaded, total: event.total });
    };
    xhr.onerror = () => reject(new ApiError(0, NETWORK_ERROR_CODE, "The upload could not reach the server. Check the connection and try again."));
    xhr.onabort = () => reject(new DOMException("The upload was cancelled.", "AbortError"));
    xhr.onload = () => {
      let data: unknown;
      try {
        data = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        data = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        resolve(data as T);
        return;
      }
      const parsed = apiErrorSchema.safeParse(data);
      if (parsed.success) {
        const { code, message, fields } = parsed.data.error;
        reject(new ApiError(xhr.status, code, message, fields, null, data));
      } else if (xhr.status === 413) {
        reject(new ApiError(413, "too_large", "The file is larger than the upload limit."));
      } else {
        reject(new ApiError(xhr.status, `http_${xhr.status}`, `The server answered with an unexpected error (${xhr.status}).`));
      }
    };
    signal?.addEventListener("abort", () => xhr.abort(), { once: true });
    const form = new FormData();
    form.append(field, file);
    xhr.send(form);
  });
}
