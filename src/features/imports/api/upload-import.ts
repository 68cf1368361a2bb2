import { CSRF_HEADER, CSRF_VALUE } from '../../../../shared/constants/errors';
import { errorEnvelopeSchema } from '../../../../shared/schemas/common';
import { importUploadResponseSchema, type ImportDetail } from '../../../../shared/schemas/imports';
import { ApiError } from '../../../lib/api-client';

/**
 * Sends a file as multipart `file`, reporting the share uploaded. fetch() reports no upload progress,
 * so this one request goes through XMLHttpRequest; errors become the same ApiError as everywhere.
 */
export function uploadImport(file: File, onProgress: (fraction: number) => void): Promise<ImportDetail> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/imports');
    xhr.setRequestHeader(CSRF_HEADER, CSRF_VALUE);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onerror = () => reject(new ApiError(0, 'internal', 'The server cannot be reached; check the connection and try again'));
    xhr.onload = () => {
      let json: unknown;
      try {
        json = JSON.parse(xhr.responseText);
      } catch {
        json = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        const parsed = importUploadResponseSchema.safeParse(json);
        if (parsed.success) resolve(parsed.data);
        else reject(new ApiError(xhr.status, 'internal', 'The server sent an answer this page does not understand'));
        return;
      }
      const env = errorEnvelopeSchema.safeParse(json);
      reject(
        env.success
          ? new ApiError(xhr.status, env.data.error.code, env.data.error.message, env.data.error.fieldErrors, env.data.error.requestId)
          : new ApiError(xhr.status, xhr.status >= 500 ? 'internal' : 'validation_failed', `The server answered ${xhr.status}`),
      );
    };
    const body = new FormData();
    body.append('file', file);
    xhr.send(body);
  });
}
