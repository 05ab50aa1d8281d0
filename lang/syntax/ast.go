package syntax

// Node is any node of the syntax tree; Pos is where it starts.
type Node interface{ Pos() Pos }

// Expr is an expression node.
type Expr interface {
	Node
	exprNode()
}

// Stmt is a statement node.
type Stmt interface {
	Node
	stmtNode()
}

type (
	// Ident is a name.
	Ident struct {
		NamePos Pos
		Name    string
	}
	// NumberLit is a real or imaginary number literal.
	NumberLit struct {
		LitPos Pos
		Lit    string
		Value  float64
		Imag   bool // written with j: the value is Value*1j
	}
	// StringLit is a string literal (already unquoted).
	StringLit struct {
		LitPos Pos
		Value  string
	}
	// BoolLit is true or false.
	BoolLit struct {
		LitPos Pos
		Value  bool
	}
	// ListLit is [a, b, ...]: a vector, a matrix (rows) or a list.
	ListLit struct {
		Lbrack Pos
		Elems  []Expr
		Rbrack Pos
	}
	// RecordLit is {name: value, ...}.
	RecordLit struct {
		Lbrace Pos
		Fields []*FieldInit
		Rbrace Pos
	}
	// FieldInit is one name: value of a record.
	FieldInit struct {
		Name  *Ident
		Value Expr
	}
	// UnaryExpr is -x or not x.
	UnaryExpr struct {
		OpPos Pos
		Op    Token
		X     Expr
	}
	// BinaryExpr is x op y.
	BinaryExpr struct {
		Start Pos // where the node begins, kept so Pos is O(1)
		X     Expr
		OpPos Pos
		Op    Token
		Y     Expr
	}
	// CallExpr is f(args).
	CallExpr struct {
		Start  Pos // where the node begins, kept so Pos is O(1)
		Fun    Expr
		Lparen Pos
		Args   []*Arg
		Rparen Pos
	}
	// Arg is a call argument; Name is nil for a positional one.
	Arg struct {
		Name  *Ident
		Value Expr
	}
	// IndexExpr is x[i] or x[i, j] (1-based); an index may be a
	// RangeExpr.
	IndexExpr struct {
		Start   Pos // where the node begins, kept so Pos is O(1)
		X       Expr
		Lbrack  Pos
		Indices []Expr
		Rbrack  Pos
	}
	// RangeExpr is lo:hi inside an index (positions lo to hi, both
	// included); Lo or Hi is nil when left out (from the first, to the
	// last).
	RangeExpr struct {
		Start Pos // where the node begins, kept so Pos is O(1)
		Lo    Expr
		Colon Pos
		Hi    Expr
	}
	// FieldExpr is x.name.
	FieldExpr struct {
		Start Pos // where the node begins, kept so Pos is O(1)
		X     Expr
		Dot   Pos
		Name  *Ident
	}
	// IfExpr is if cond then a else b.
	IfExpr struct {
		IfPos      Pos
		Cond, Then Expr
		Else       Expr
	}
	// SystemBlock is system [every T] { declarations and equations }.
	SystemBlock struct {
		SystemPos Pos
		Every     Expr // nil for continuous time
		Lbrace    Pos
		Items     []BlockItem
		Rbrace    Pos
	}
)

// BlockItem is a declaration or an equation inside a system block.
type BlockItem interface {
	Node
	blockItem()
}

type (
	// Decl is "states a, b" / "inputs u" / "outputs y".
	Decl struct {
		KindPos Pos
		Kind    string // "states", "inputs" or "outputs"
		Names   []*Ident
	}
	// Equation is name' = rhs (Derivative), next name = rhs (Next) or
	// name = rhs (an output or a helper definition).
	Equation struct {
		Start Pos // of 'next' or of the name
		Kind  EqKind
		Name  *Ident
		Eq    Pos
		Rhs   Expr
	}
)

// EqKind tells the three kinds of equations apart.
type EqKind int

// The kinds of equations in a system block.
const (
	EqPlain      EqKind = iota // y = ...
	EqDerivative               // x' = ...
	EqNext                     // next x = ...
)

type (
	// AssignStmt is name = value.
	AssignStmt struct {
		Name  *Ident
		Eq    Pos
		Value Expr
	}
	// FuncDef is name(params) = body.
	FuncDef struct {
		Name   *Ident
		Params []*Ident
		Eq     Pos
		Body   Expr
	}
	// ExprStmt is an expression on its own.
	ExprStmt struct {
		X Expr
	}
)

func (x *Ident) Pos() Pos       { return x.NamePos }
func (x *NumberLit) Pos() Pos   { return x.LitPos }
func (x *StringLit) Pos() Pos   { return x.LitPos }
func (x *BoolLit) Pos() Pos     { return x.LitPos }
func (x *ListLit) Pos() Pos     { return x.Lbrack }
func (x *RecordLit) Pos() Pos   { return x.Lbrace }
func (x *UnaryExpr) Pos() Pos   { return x.OpPos }
func (x *BinaryExpr) Pos() Pos  { return x.Start }
func (x *CallExpr) Pos() Pos    { return x.Start }
func (x *IndexExpr) Pos() Pos   { return x.Start }
func (x *FieldExpr) Pos() Pos   { return x.Start }
func (x *RangeExpr) Pos() Pos   { return x.Start }
func (x *IfExpr) Pos() Pos      { return x.IfPos }
func (x *SystemBlock) Pos() Pos { return x.SystemPos }
func (x *Decl) Pos() Pos        { return x.KindPos }
func (x *Equation) Pos() Pos    { return x.Start }
func (x *AssignStmt) Pos() Pos  { return x.Name.NamePos }
func (x *FuncDef) Pos() Pos     { return x.Name.NamePos }
func (x *ExprStmt) Pos() Pos    { return x.X.Pos() }

func (*Ident) exprNode()       {}
func (*NumberLit) exprNode()   {}
func (*StringLit) exprNode()   {}
func (*BoolLit) exprNode()     {}
func (*ListLit) exprNode()     {}
func (*RecordLit) exprNode()   {}
func (*UnaryExpr) exprNode()   {}
func (*BinaryExpr) exprNode()  {}
func (*CallExpr) exprNode()    {}
func (*IndexExpr) exprNode()   {}
func (*FieldExpr) exprNode()   {}
func (*RangeExpr) exprNode()   {}
func (*IfExpr) exprNode()      {}
func (*SystemBlock) exprNode() {}

func (*Decl) blockItem()     {}
func (*Equation) blockItem() {}

func (*AssignStmt) stmtNode() {}
func (*FuncDef) stmtNode()    {}
func (*ExprStmt) stmtNode()   {}
