// The one way a CSV upload comes in: after the route's access check (ApiRouter runs `before`
// middleware only then), multer streams the file part straight into UPLOAD_DIR under a random
// name, so a large body is never held in memory; a refused or failed upload leaves no file.
import type { Request, RequestHandler } from "express";
import { randomUUID } from "node:crypto";
import { mkdir } from "node:fs/promises";
import multer from "multer";
import type { UploadedFile } from "../services/uploadLifecycle";
import { badRequest } from "./errors";

/** Middleware that streams the form field "file" (at most `maxBytes`) into `uploadDir`; over the limit multer answers 413 and removes the part written. */
export function csvUpload(uploadDir: string, maxBytes: number): RequestHandler {
  const storage = multer.diskStorage({
    destination: (_req, _file, done) => {
      mkdir(uploadDir, { recursive: true, mode: 0o700 }).then(
        () => done(null, uploadDir),
        (err: Error) => done(err, uploadDir),
      );
    },
    filename: (_req, _file, done) => done(null, `${randomUUID()}.csv`),
  });
  return multer({ storage, limits: { fileSize: maxBytes, files: 1, fields: 10 } }).single("file");
}

/** The uploaded file of the request; 400 when the form had none. */
export function uploadedFile(req: Request): UploadedFile {
  const file = req.file;
  if (!file) throw badRequest('Attach the CSV file as the form field "file".', { file: "A CSV file is required" });
  return { originalname: file.originalname, path: file.path, size: file.size };
}
