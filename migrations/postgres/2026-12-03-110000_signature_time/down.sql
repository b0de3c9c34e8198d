ALTER TABLE signatures ALTER COLUMN signed_at TYPE TEXT COLLATE "C" USING signed_at::text;
