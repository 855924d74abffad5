CREATE TABLE "count_rows" (
	"dataset_id" uuid NOT NULL,
	"line" integer NOT NULL,
	"site" text NOT NULL,
	"time" double precision NOT NULL,
	"label" text NOT NULL,
	"count" double precision NOT NULL,
	"stage_counts" jsonb,
	CONSTRAINT "count_rows_dataset_id_line_pk" PRIMARY KEY("dataset_id","line")
);
--> statement-breakpoint
CREATE TABLE "datasets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"name" varchar(120) NOT NULL,
	"kind" varchar(20) NOT NULL,
	"file_name" varchar(255) NOT NULL,
	"file_bytes" integer NOT NULL,
	"file_content" "bytea" NOT NULL,
	"row_count" integer NOT NULL,
	"mapping" jsonb NOT NULL,
	"options" jsonb NOT NULL,
	"stages" jsonb NOT NULL,
	"sites" jsonb NOT NULL,
	"first_year" double precision,
	"last_year" double precision,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fate_rows" (
	"dataset_id" uuid NOT NULL,
	"line" integer NOT NULL,
	"site" text NOT NULL,
	"individual" text NOT NULL,
	"year" double precision NOT NULL,
	"stage" smallint NOT NULL,
	"fate" smallint NOT NULL,
	"offspring" double precision,
	CONSTRAINT "fate_rows_dataset_id_line_pk" PRIMARY KEY("dataset_id","line")
);
--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "dataset_id" uuid;--> statement-breakpoint
ALTER TABLE "count_rows" ADD CONSTRAINT "count_rows_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "datasets" ADD CONSTRAINT "datasets_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "datasets" ADD CONSTRAINT "datasets_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fate_rows" ADD CONSTRAINT "fate_rows_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "datasets_study_idx" ON "datasets" USING btree ("study_id","created_at");--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "runs_dataset_idx" ON "runs" USING btree ("dataset_id","created_at");