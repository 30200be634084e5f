using System;
using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.Sqlite.Migrations
{
    /// <inheritdoc />
    public partial class CatalogueVersions : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<int>(
                name: "version",
                table: "catalogue",
                type: "INTEGER",
                nullable: false,
                defaultValue: 1);

            migrationBuilder.CreateTable(
                name: "catalogue_version_entry",
                columns: table => new
                {
                    id = table.Column<long>(type: "INTEGER", nullable: false)
                        .Annotation("Sqlite:Autoincrement", true),
                    catalogue_id = table.Column<long>(type: "INTEGER", nullable: false),
                    version = table.Column<int>(type: "INTEGER", nullable: false),
                    candidate_id = table.Column<long>(type: "INTEGER", nullable: false),
                    label = table.Column<string>(type: "TEXT", nullable: false),
                    family = table.Column<string>(type: "TEXT", nullable: true),
                    @params = table.Column<string>(name: "params", type: "TEXT", nullable: true),
                    lhs = table.Column<string>(type: "TEXT", nullable: false),
                    rhs = table.Column<string>(type: "TEXT", nullable: false),
                    field = table.Column<string>(type: "TEXT", nullable: false),
                    identity = table.Column<string>(type: "TEXT", nullable: true),
                    state = table.Column<string>(type: "TEXT", nullable: false),
                    error_bound_log2 = table.Column<double>(type: "REAL", nullable: true),
                    trials_zero = table.Column<int>(type: "INTEGER", nullable: false),
                    replaced_at = table.Column<DateTime>(type: "TEXT", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP")
                },
                constraints: table =>
                {
                    table.PrimaryKey("pk_catalogue_version_entry", x => x.id);
                    table.ForeignKey(
                        name: "fk_catalogue_version_entry_catalogue",
                        column: x => x.catalogue_id,
                        principalTable: "catalogue",
                        principalColumn: "id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateIndex(
                name: "ix_catalogue_version_entry_version",
                table: "catalogue_version_entry",
                columns: new[] { "catalogue_id", "version" });
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropTable(
                name: "catalogue_version_entry");

            migrationBuilder.DropColumn(
                name: "version",
                table: "catalogue");
        }
    }
}
