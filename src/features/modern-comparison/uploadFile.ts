// Sends one file as the form field "file" with XMLHttpRequest, whose upload progress events fetch()
// lacks; a refusal becomes the ApiError the rest of the client knows.
import { apiErrorSchema } from "@shared/schemas/common";
import { ApiError, NETWORK_ERROR_CODE } from "../../lib/api";

export interface UploadProgress {
  loaded: number;
  total: number;
}

export function uploadFile<T>(path: string, file: File, onProgress: (p: UploadProgress) => void): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api${path}`);
    xhr.setRequestHeader("Accept", "application/json");
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) onProgress({ loaded: event.loaded, total: event.total });
    };
    xhr.onerror = () => reject(new ApiError(0, NETWORK_ERROR_CODE, "The upload could not reach the server. Check the connection and try again."));
    xhr.onload = () => {
      let data: unknown;
      try {
        data = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        data = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(data as T);
      const parsed = apiErrorSchema.safeParse(data);
      if (parsed.success) reject(new ApiError(xhr.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.fields, null, data));
      else reject(new ApiError(xhr.status, `http_${xhr.status}`, xhr.status === 413 ? "The file is larger than the upload limit." : `The server answered with an unexpected error (${xhr.status}).`));
    };
    const form = new FormData();
    form.append("file", file);
    xhr.send(form);
  });
}
