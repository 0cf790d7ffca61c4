// Multipart uploads: one `file` field held in memory, at most 1 MB; text files only (UTF-8, no NUL bytes).
import type { Request, RequestHandler } from "express";
import multer from "multer";
import { HttpError } from "../lib/errors.ts";

/** Largest accepted upload, bytes. */
export const MAX_UPLOAD_BYTES = 1024 * 1024;

const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 20, fieldSize: 64 * 1024 },
});

/** multer's `single("file")` with its errors turned into the API's error shape (413 for an oversize file). */
export const singleFile: RequestHandler = (req, res, next) => {
  upload.single("file")(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      if (err.code === "LIMIT_FILE_SIZE") {
        return next(
          new HttpError(
            413,
            "payload_too_large",
            `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB.`,
          ),
        );
      }
      if (err.code === "LIMIT_UNEXPECTED_FILE") {
        return next(
          new HttpError(
            400,
            "bad_upload",
            `Send the file in the multipart field "file" (got "${err.field ?? ""}").`,
          ),
        );
      }
      return next(new HttpError(400, "bad_upload", `Upload refused: ${err.message}.`));
    }
    return next(
      new HttpError(400, "bad_upload", "The request is not a readable multipart/form-data upload."),
    );
  });
};

export interface UploadedText {
  name: string;
  text: string;
}

/**
 * The uploaded file as text. 400 when no file was sent or it is empty; 415 when it is binary
 * (a NUL byte, or not valid UTF-8). A leading byte-order mark is dropped.
 */
export function uploadedText(req: Request): UploadedText {
  const file = req.file;
  if (!file) throw new HttpError(400, "file_missing", 'Attach the file in the multipart field "file".');
  const bytes = file.buffer;
  if (bytes.length === 0) throw new HttpError(400, "file_empty", "The file is empty.");
  if (bytes.includes(0)) {
    throw new HttpError(
      415,
      "binary_file",
      `${file.originalname || "The file"} is a binary file (it contains NUL bytes); upload a text CSV or JSON file.`,
    );
  }
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new HttpError(
      415,
      "binary_file",
      `${file.originalname || "The file"} is not UTF-8 text; upload a text CSV or JSON file.`,
    );
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return { name: file.originalname || "upload", text };
}
