/**
 * Frame routes: the fixed upload route under /api/instruments (browser and scripts with a
 * personal API token use the same one) and /api/frames. See service.ts for who may do what.
 */
import { Router, type ErrorRequestHandler, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { bulkUpdateFramesSchema, listFramesQuerySchema, regionsSchema, updateFrameSchema, uploadFieldsSchema } from '../../../shared/api/frames.ts';
import { requireRole } from '../../auth/access.ts';
import { requireUser } from '../../auth/middleware.ts';
import { HttpError, ValidationError } from '../../lib/errors.ts';
import { validated } from '../../lib/validate.ts';
import { instrumentParams } from '../instruments/routes.ts';
import { decodeUpload } from './decode.ts';
import {
  bulkUpdateFrames,
  deleteFrame,
  getFrame,
  getFrameFile,
  listFramesFor,
  saveInstrumentRegions,
  storeUploads,
  updateFrame,
  UPLOAD_ROLES,
  type FramesDeps,
} from './service.ts';

export const MAX_FILES_PER_UPLOAD = 50;
const frameParams = z.object({ frameId: z.uuid({ error: 'frameId must be a UUID' }) });

export interface FrameRoutesDeps extends FramesDeps {
  /** Largest accepted file, bytes (config FRAME_MAX_BYTES). */
  maxBytes: number;
}

/** multer's limit errors as API errors (a too-large file is the engine-style `bad_frame` 413). */
function multerErrors(maxBytes: number): ErrorRequestHandler {
  return (error, _req, _res, next) => {
    if (!(error instanceof multer.MulterError)) return next(error);
    const name = error.field === 'file' && (error as { filename?: string }).filename ? `${(error as { filename?: string }).filename}: ` : '';
    switch (error.code) {
      case 'LIMIT_FILE_SIZE':
        return next(new HttpError(413, 'bad_frame', `${name}the file is larger than the upload limit of ${maxBytes} bytes (FRAME_MAX_BYTES).`, { limitBytes: maxBytes }));
      case 'LIMIT_FILE_COUNT':
        return next(new ValidationError(`At most ${MAX_FILES_PER_UPLOAD} files per upload.`));
      case 'LIMIT_UNEXPECTED_FILE':
        return next(new ValidationError(`Unexpected file field "${error.field ?? ''}"; send frames in the field "file".`));
      default:
        return next(new ValidationError(`The multipart upload was refused: ${error.message}.`));
    }
  };
}

/** Mounted at /api/instruments: the upload and the instrument's default regions. */
export function instrumentFramesRouter(deps: FrameRoutesDeps): Router {
  const { db } = deps;
  const router = Router();
  router.use(requireUser);
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: deps.maxBytes, files: MAX_FILES_PER_UPLOAD, fields: 50, fieldSize: 64 * 1024, parts: MAX_FILES_PER_UPLOAD + 50 },
  });
  // Who may upload is decided before multer buffers the body.
  const mayUpload: RequestHandler = async (req, _res, next) => {
    const { instrumentId } = instrumentParams.parse(req.params);
    await requireRole(db, req.user!, instrumentId, UPLOAD_ROLES, 'upload frames');
    next();
  };
  router.post(
    '/:instrumentId/frames',
    mayUpload,
    upload.array('file', MAX_FILES_PER_UPLOAD),
    multerErrors(deps.maxBytes),
    validated({ params: instrumentParams, body: uploadFieldsSchema }, async (req, res, { params, body }) => {
      const files = (req.files as Express.Multer.File[] | undefined) ?? [];
      if (files.length === 0) throw new ValidationError('No file in the upload; send the frame in the multipart field "file".');
      // Every page of every file decodes before anything is stored (all or nothing).
      const decoded = [];
      for (const f of files) {
        decoded.push(await decodeUpload(f.originalname || 'frame', new Uint8Array(f.buffer.buffer, f.buffer.byteOffset, f.buffer.byteLength)));
      }
      res.status(201).json(await storeUploads(deps, req.user!, params.instrumentId, decoded, body));
    }),
  );
  router.put(
    '/:instrumentId/regions',
    validated({ params: instrumentParams, body: regionsSchema }, async (req, res, { params, body }) => {
      res.json(await saveInstrumentRegions(db, req.user!, params.instrumentId, body));
    }),
  );
  return router;
}

/** Mounted at /api/frames. */
export function framesRouter(deps: FrameRoutesDeps): Router {
  const { db } = deps;
  const router = Router();
  router.use(requireUser);
  router.get(
    '/',
    validated({ query: listFramesQuerySchema }, async (req, res, { query }) => {
      res.json(await listFramesFor(db, req.user!, query));
    }),
  );
  router.post(
    '/bulk-update',
    validated({ body: bulkUpdateFramesSchema }, async (req, res, { body }) => {
      res.json(await bulkUpdateFrames(db, req.user!, body));
    }),
  );
  router.get(
    '/:frameId',
    validated({ params: frameParams }, async (req, res, { params }) => {
      res.json(await getFrame(db, req.user!, params.frameId));
    }),
  );
  router.get(
    '/:frameId/file',
    validated({ params: frameParams }, async (req, res, { params }) => {
      const file = await getFrameFile(deps, req.user!, params.frameId);
      const etag = `"${file.sha256}"`;
      res.set({
        'Content-Type': 'application/octet-stream',
        'Cache-Control': 'private, max-age=31536000, immutable',
        ETag: etag,
        'Content-Disposition': `attachment; filename*=UTF-8''${encodeURIComponent(file.originalName)}`,
      });
      if (req.get('if-none-match') === etag) {
        res.status(304).end();
        return;
      }
      res.end(Buffer.from(file.bytes.buffer, file.bytes.byteOffset, file.bytes.byteLength));
    }),
  );
  router.patch(
    '/:frameId',
    validated({ params: frameParams, body: updateFrameSchema }, async (req, res, { params, body }) => {
      res.json(await updateFrame(db, req.user!, params.frameId, body));
    }),
  );
  router.delete(
    '/:frameId',
    validated({ params: frameParams }, async (req, res, { params }) => {
      await deleteFrame(deps, req.user!, params.frameId);
      res.status(204).end();
    }),
  );
  return router;
}
