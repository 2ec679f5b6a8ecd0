-- Data migration: each customer's e-mail and phone become their first contact before the columns go.
INSERT INTO "customer_contacts" ("customer_id", "name", "email", "phone", "position")
SELECT "id", "name", "email", "phone", 0
FROM "customers"
WHERE ("email" IS NOT NULL OR "phone" IS NOT NULL)
  AND NOT EXISTS (SELECT 1 FROM "customer_contacts" cc WHERE cc."customer_id" = "customers"."id");
