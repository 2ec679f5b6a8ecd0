-- Invoice states and actions in our own words: existing invoices keep their state under its new
-- name (the type is recreated with these names by the next migration, which then casts cleanly),
-- and the audit log's old action names become the new ones, so the history reads one way.
ALTER TYPE "public"."invoice_status" RENAME VALUE 'draft' TO 'preparing';--> statement-breakpoint
ALTER TYPE "public"."invoice_status" RENAME VALUE 'open' TO 'due';--> statement-breakpoint
ALTER TYPE "public"."invoice_status" RENAME VALUE 'void' TO 'cancelled';--> statement-breakpoint
ALTER TYPE "public"."invoice_status" RENAME VALUE 'uncollectible' TO 'written_off';--> statement-breakpoint
UPDATE "audit_log" SET "action" = CASE "action"
  WHEN 'invoice.finalize' THEN 'invoice.issued'
  WHEN 'invoice.send' THEN 'invoice.sent'
  WHEN 'invoice.void' THEN 'invoice.cancelled'
  WHEN 'invoice.mark_uncollectible' THEN 'invoice.written_off'
  WHEN 'invoice.record_payment' THEN 'invoice.payment_recorded'
END
WHERE "action" IN ('invoice.finalize', 'invoice.send', 'invoice.void', 'invoice.mark_uncollectible', 'invoice.record_payment');--> statement-breakpoint
UPDATE "audit_log" SET "detail" = jsonb_set("detail", '{status}', to_jsonb(CASE "detail"->>'status'
  WHEN 'draft' THEN 'preparing' WHEN 'open' THEN 'due' WHEN 'void' THEN 'cancelled' WHEN 'uncollectible' THEN 'written_off' END))
WHERE "action" = 'invoice.paid_while_closed' AND "detail"->>'status' IN ('draft', 'open', 'void', 'uncollectible');
