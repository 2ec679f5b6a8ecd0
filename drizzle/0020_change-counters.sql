CREATE TABLE "change_counters" (
	"topic" text NOT NULL,
	"subject_id" uuid NOT NULL,
	"version" bigint NOT NULL,
	CONSTRAINT "change_counters_pk" PRIMARY KEY("topic","subject_id")
);
