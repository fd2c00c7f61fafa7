CREATE TABLE "upload_refs" (
	"upload_id" integer NOT NULL,
	"subject" text NOT NULL,
	"subject_id" integer NOT NULL,
	CONSTRAINT "upload_refs_upload_id_subject_subject_id_pk" PRIMARY KEY("upload_id","subject","subject_id")
);
--> statement-breakpoint
ALTER TABLE "uploads" ADD COLUMN "storage_key" text NOT NULL;--> statement-breakpoint
ALTER TABLE "uploads" ADD COLUMN "unreferenced_since" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "upload_refs" ADD CONSTRAINT "upload_refs_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "upload_refs_subject_idx" ON "upload_refs" USING btree ("subject","subject_id");--> statement-breakpoint
CREATE INDEX "uploads_owner_idx" ON "uploads" USING btree ("owner_id");