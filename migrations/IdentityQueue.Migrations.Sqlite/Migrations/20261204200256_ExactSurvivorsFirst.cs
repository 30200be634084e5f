using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
{
    /// <inheritdoc />
    public partial class ExactSurvivorsFirst : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            // Survivors decided exactly (no error bound: NULL) first, then strongest evidence; the same order in SQLite
            // (NULLs first) and PostgreSQL (NULLs last by default).
            migrationBuilder.Sql("DROP VIEW survivors");
            migrationBuilder.Sql("""
                CREATE VIEW survivors AS
                SELECT candidate_id, catalogue, label, family, state, degree_bound, trials, error_bound_log2,
                       witness_modulus, witness_point, message, params, field
                FROM verdicts
                WHERE state = 'survived'
                ORDER BY CASE WHEN error_bound_log2 IS NULL THEN 0 ELSE 1 END, error_bound_log2 ASC, candidate_id ASC
                """);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW survivors");
            migrationBuilder.Sql("""
                CREATE VIEW survivors AS
                SELECT candidate_id, catalogue, label, family, state, degree_bound, trials, error_bound_log2,
                       witness_modulus, witness_point, message, params, field
                FROM verdicts
                WHERE state = 'survived'
                ORDER BY error_bound_log2 ASC, candidate_id ASC
                """);
        }
    }
}
