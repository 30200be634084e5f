using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
{
    /// <inheritdoc />
    public partial class CanonicalTrialKeys : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<int>(
                name: "key_scheme",
                table: "catalogue",
                type: "INTEGER",
                nullable: false,
                defaultValue: 1);

            // Catalogues imported before this version seeded their trials with the candidate's id: they keep doing so
            // (key_scheme 0), so their stored trials stay reproducible and a later run extends them consistently.
            migrationBuilder.Sql("UPDATE catalogue SET key_scheme = 0");
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropColumn(
                name: "key_scheme",
                table: "catalogue");
        }
    }
}
