import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { badRequest, HttpError, notFound } from '../../http-error';
import type { AuthUser } from '../../telemetry/types';
import { pushWorkOrder } from './notify';
import type { WorkOrderService } from './work-order-service';

export const MAX_ATTACHMENT_BYTES = 8 * 1024 * 1024;

interface Sniffed {
  contentType: 'image/jpeg' | 'image/png' | 'image/webp' | 'application/pdf';
  ext: string;
}

/** What the file IS, from its first bytes; the name and the client's type are not trusted. */
export function sniffContent(buf: Buffer): Sniffed | null {
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return { contentType: 'image/jpeg', ext: 'jpg' };
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])))
    return { contentType: 'image/png', ext: 'png' };
  if (buf.length >= 12 && buf.toString('latin1', 0, 4) === 'RIFF' && buf.toString('latin1', 8, 12) === 'WEBP')
    return { contentType: 'image/webp', ext: 'webp' };
  if (buf.length >= 5 && buf.toString('latin1', 0, 5) === '%PDF-') return { contentType: 'application/pdf', ext: 'pdf' };
  return null;
}

/** C0 and C1 controls, DEL, and the bidirectional embeddings, overrides and isolates. */
const UNSAFE_IN_NAME = (c: number) => c <= 0x1f || (c >= 0x7f && c <= 0x9f) || (c >= 0x202a && c <= 0x202e) || (c >= 0x2066 && c <= 0x2069);

/** The client's file name, kept only as a label: no folders, no control characters, bounded. */
export function cleanOriginalName(name: string | undefined): string {
  const base = (name ?? '').split(/[\\/]/).pop() ?? '';
  // control characters out; bidirectional overrides would let `x\u202Egnp.exe` display as `xexe.png`
  const cleaned = [...base]
    .map((ch) => (UNSAFE_IN_NAME(ch.codePointAt(0)!) || '"<>|:*?'.includes(ch) ? '_' : ch))
    .join('')
    .replace(/^\.+/, '')
    .trim()
    .slice(0, 200);
  return cleaned || 'file';
}

export const uploadsDir = (dataDir: string) => path.join(dataDir, 'uploads');

export async function addAttachment(
  svc: WorkOrderService,
  user: AuthUser,
  orderId: number,
  file: { buffer: Buffer; originalname?: string; size: number } | undefined,
  stepId: number | null,
) {
  if (!file) throw badRequest('send one file in the form field "file"', 'file');
  const order = await svc.getOrder(orderId);
  svc.assertEditable(order);
  if (user.role === 'operator') throw new HttpError(403, 'operators do not attach files to work orders');
  if (stepId !== null) {
    const step = await svc.models.WorkOrderStep.findOne({ where: { id: stepId, workOrderId: orderId }, attributes: ['id'] });
    if (!step) throw badRequest('no such step on this work order', 'stepId');
  }
  const kind = sniffContent(file.buffer);
  if (!kind) throw new HttpError(415, 'only JPEG, PNG or WebP photos and PDF documents are accepted (checked by content)', 'file');
  const dir = uploadsDir(svc.ctx.config.dataDir);
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  const storedName = `${crypto.randomUUID()}.${kind.ext}`;
  await fs.promises.writeFile(path.join(dir, storedName), file.buffer, { flag: 'wx', mode: 0o600 });
  try {
    const row = await svc.ctx.sequelize.transaction(async (transaction) => {
      const a = await svc.models.Attachment.create(
        {
          workOrderId: orderId,
          stepId,
          storedName,
          originalName: cleanOriginalName(file.originalname),
          contentType: kind.contentType,
          size: file.buffer.length,
          uploadedBy: user.id,
        },
        { transaction },
      );
      await svc.event(
        orderId,
        user.id,
        'attachment-added',
        { details: { attachmentId: a.id, stepId, contentType: a.contentType, size: a.size, name: a.originalName } },
        transaction,
      );
      return a;
    });
    pushWorkOrder(svc.ctx, order, 'attachment');
    return row;
  } catch (err) {
    await fs.promises.rm(path.join(dir, storedName), { force: true });
    throw err;
  }
}

/** The stored file of an attachment; the path comes from our generated name only. */
export async function attachmentFile(svc: WorkOrderService, id: number) {
  const a = await svc.models.Attachment.findByPk(id);
  if (!a) throw notFound('attachment');
  const file = path.join(uploadsDir(svc.ctx.config.dataDir), path.basename(a.storedName));
  if (!fs.existsSync(file)) throw notFound('attachment file');
  return { attachment: a, file };
}
