ALTER TABLE "cell_results" DROP CONSTRAINT "cell_results_field_id_fields_id_fk";
--> statement-breakpoint
DROP INDEX "cell_results_field_id_col_row_index";