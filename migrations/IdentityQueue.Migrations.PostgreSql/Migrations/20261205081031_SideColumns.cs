using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace IdentityQueue.Migrations.PostgreSql.Migrations
{
    /// <inheritdoc />
    public partial class SideColumns : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<int>(
                name: "lhs_column",
                table: "candidate",
                type: "integer",
                nullable: true);

            migrationBuilder.AddColumn<int>(
                name: "rhs_column",
                table: "candidate",
                type: "integer",
                nullable: true);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropColumn(
                name: "lhs_column",
                table: "candidate");

            migrationBuilder.DropColumn(
                name: "rhs_column",
                table: "candidate");
        }
    }
}
