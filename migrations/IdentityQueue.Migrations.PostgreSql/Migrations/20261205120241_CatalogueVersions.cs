using System;
using Microsoft.EntityFrameworkCore.Migrations;
using Npgsql.EntityFrameworkCore.PostgreSQL.Metadata;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
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
                type: "integer",
                nullable: false,
                defaultValue: 1);

            migrationBuilder.CreateTable(
                name: "catalogue_version_entry",
                columns: table => new
                {
                    id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    catalogue_id = table.Column<long>(type: "bigint", nullable: false),
                    version = table.Column<int>(type: "integer", nullable: false),
                    candidate_id = table.Column<long>(type: "bigint", nullable: false),
                    label = table.Column<string>(type: "text", nullable: false),
                    family = table.Column<string>(type: "text", nullable: true),
                    @params = table.Column<string>(name: "params", type: "text", nullable: true),
                    lhs = table.Column<string>(type: "text", nullable: false),
                    rhs = table.Column<string>(type: "text", nullable: false),
                    field = table.Column<string>(type: "text", nullable: false),
                    identity = table.Column<string>(type: "text", nullable: true),
                    state = table.Column<string>(type: "text", nullable: false),
                    error_bound_log2 = table.Column<double>(type: "double precision", nullable: true),
                    trials_zero = table.Column<int>(type: "integer", nullable: false),
                    replaced_at = table.Column<DateTime>(type: "timestamp with time zone", nullable: false, defaultValueSql: "CURRENT_TIMESTAMP")
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
