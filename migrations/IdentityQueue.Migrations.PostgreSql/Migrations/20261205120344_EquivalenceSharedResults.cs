using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <summary>
    /// Shared results of equivalence groups (#15 point 4): <c>result.shared_from</c> (the representative whose result a
    /// member shares), <c>equivalence.false_match_bits</c> (k of "chance of a false match ≤ 2^-k"), and the view
    /// <c>equivalents</c> with that column added (its columns kept).
    /// </summary>
    public partial class EquivalenceSharedResults : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<long>(
                name: "shared_from",
                table: "result",
                type: "bigint",
                nullable: true);

            migrationBuilder.AddColumn<int>(
                name: "false_match_bits",
                table: "equivalence",
                type: "integer",
                nullable: true);

            migrationBuilder.Sql("DROP VIEW equivalents");
            migrationBuilder.Sql(EquivalentsView(withBits: true));
        }

        private static string EquivalentsView(bool withBits) => $"""
            CREATE VIEW equivalents AS
            SELECT e.candidate_id AS candidate_id, c.label AS label, g.label AS group_label, e.group_candidate_id AS group_candidate_id,
                   CASE WHEN e.swapped THEN 1 ELSE 0 END AS swapped{(withBits ? ", e.false_match_bits AS false_match_bits" : "")}
            FROM equivalence e JOIN candidate c ON c.id = e.candidate_id JOIN candidate g ON g.id = e.group_candidate_id
            """;

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.Sql("DROP VIEW equivalents");
            migrationBuilder.Sql(EquivalentsView(withBits: false));

            migrationBuilder.DropColumn(
                name: "shared_from",
                table: "result");

            migrationBuilder.DropColumn(
                name: "false_match_bits",
                table: "equivalence");
        }
    }
}
